"""Fluid helpers (clinic_app.clinical.fluids): clinical-facts.md §10, §12, §13 and the
numeric checks N1-N12 of §18. Each test id names the check, its source and the variant."""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from clinic_app.clinical import fluids


@pytest.mark.parametrize(
    ("weight", "above_20", "expected"),
    [
        pytest.param(10, 20, 1000, id="N1-S26-holliday-segar-daily-original-10kg"),
        pytest.param(20, 20, 1500, id="N2-S26-holliday-segar-daily-original-20kg"),
        pytest.param(70, 20, 2500, id="N3-S26-holliday-segar-daily-original-70kg"),
        pytest.param(70, 25, 2750, id="N3-S26-holliday-segar-daily-25ml-variant-70kg"),
        pytest.param(5, 20, 500, id="N5-S26-holliday-segar-daily-original-5kg"),
        pytest.param(15, 20, 1250, id="N5-S26-holliday-segar-daily-original-15kg"),
        pytest.param(20, 25, 1500, id="S26-25ml-variant-changes-nothing-up-to-20kg"),
    ],
)
def test_it_computes_holliday_segar_daily_maintenance(weight, above_20, expected):
    assert fluids.maintenance_daily_ml(weight, above_20) == expected


def test_the_original_rate_above_20_kg_is_the_default():
    # S26 original Holliday-Segar: 20 ml/kg/day above 20 kg (C10 names the 25 ml/kg variant).
    assert fluids.maintenance_daily_ml(70) == 2500


@pytest.mark.parametrize(
    ("weight", "expected"),
    [
        pytest.param(10, 40, id="N4-S26-4-2-1-hourly-10kg"),
        pytest.param(20, 60, id="N4-S26-4-2-1-hourly-20kg"),
        pytest.param(30, 70, id="N4-S26-4-2-1-hourly-30kg"),
        pytest.param(70, 110, id="N4-S26-4-2-1-hourly-70kg"),
    ],
)
def test_it_computes_4_2_1_hourly_maintenance(weight, expected):
    assert fluids.maintenance_hourly_421_ml(weight) == expected


def test_the_hourly_and_daily_forms_differ_as_the_reference_says():
    # §10 / C10 (S26): 10 kg gives 40 ml/h = 960 ml/day by 4-2-1, but 1000 ml/day daily.
    assert fluids.maintenance_hourly_421_ml(10) * 24 == 960
    assert fluids.maintenance_daily_ml(10) == 1000


def test_it_refuses_a_negative_weight():
    with pytest.raises(ValueError):
        fluids.maintenance_daily_ml(-1)


@pytest.mark.parametrize(
    ("months", "method", "expected"),
    [
        pytest.param(6, "apls_updated", 7.0, id="N6-S29-updated-APLS-6mo"),
        pytest.param(12, "apls_updated", 10.0, id="N6-S29-updated-APLS-12mo"),
        pytest.param(24, "apls_updated", 12, id="N7-S29-updated-APLS-2y"),
        pytest.param(60, "apls_updated", 18, id="N7-S29-updated-APLS-5y"),
        pytest.param(72, "apls_updated", 25, id="N7-S29-updated-APLS-6y"),
        pytest.param(120, "apls_updated", 37, id="N7-S29-updated-APLS-10y"),
        pytest.param(12, "apls_classic", 10, id="N8-S29-classic-APLS-1y"),
        pytest.param(60, "apls_classic", 18, id="N8-S29-classic-APLS-5y"),
        pytest.param(120, "apls_classic", 28, id="N8-S29-classic-APLS-10y"),
        pytest.param(6, "best_guess", 7.5, id="N9-S29-best-guess-6mo"),
        pytest.param(11, "best_guess", 10.0, id="N9-S29-best-guess-11mo"),
        pytest.param(12, "best_guess", 12, id="N9-S29-best-guess-12mo-jump"),
        pytest.param(24, "best_guess", 14, id="N9-S29-best-guess-2y"),
        pytest.param(60, "best_guess", 20, id="N9-S29-best-guess-5y"),
        pytest.param(120, "best_guess", 40, id="N9-S29-best-guess-10y"),
    ],
)
def test_it_estimates_weight_from_age(months, method, expected):
    assert fluids.weight_from_age(months, method) == expected


@pytest.mark.parametrize(
    ("months", "method"),
    [
        pytest.param(6, "apls_classic", id="S29-classic-APLS-starts-at-1y"),
        pytest.param(132, "apls_classic", id="S29-classic-APLS-ends-after-10y"),
        pytest.param(156, "apls_updated", id="S29-updated-APLS-ends-after-12y-from-memory"),
        pytest.param(180, "best_guess", id="S29-best-guess-ends-after-14y"),
    ],
)
def test_it_gives_no_estimate_outside_the_formula_ages(months, method):
    assert fluids.weight_from_age(months, method) is None


def test_it_uses_exact_years_between_birthdays():
    # common practice, no source: years = months / 12 (2 x 1.5 + 8 = 11 kg at 18 months).
    assert fluids.weight_from_age(18, "apls_updated") == 11


def test_it_rejects_an_unknown_weight_method():
    with pytest.raises(ValueError):
        fluids.weight_from_age(24, "by_eye")


@pytest.mark.parametrize(
    ("weight", "sodium", "sex", "months", "litres"),
    [
        pytest.param(10, 160, None, 36, 0.857, id="N10-S31-child-10kg-Na160-TBW0.6"),
        pytest.param(70, 154, "male", 360, 4.2, id="N11-S31-adult-male-70kg-Na154-TBW0.6"),
        pytest.param(60, 150, "female", 360, 2.143, id="N11-S31-adult-female-60kg-Na150-TBW0.5"),
    ],
)
def test_it_computes_the_free_water_deficit(weight, sodium, sex, months, litres):
    assert fluids.free_water_deficit_l(weight, sodium, sex, months) == pytest.approx(litres, abs=5e-4)


def test_there_is_no_free_water_deficit_at_normal_sodium():
    # S31 formula: Na / 140 - 1 is not positive at 140 mmol/L or below.
    assert fluids.free_water_deficit_l(10, 140, None, 36) == 0.0
    assert fluids.free_water_deficit_l(10, 132, None, 36) == 0.0


@pytest.mark.parametrize(
    ("months", "sex", "fraction"),
    [
        pytest.param(12, None, 0.6, id="S31-child-0.6"),
        pytest.param(216, "male", 0.6, id="S31-adult-male-0.6"),
        pytest.param(216, "female", 0.5, id="S31-adult-female-0.5"),
        pytest.param(780, "male", 0.5, id="S31-elderly-male-0.5"),
        pytest.param(780, "female", 0.45, id="S31-elderly-female-0.45"),
        pytest.param(216, None, None, id="adult-sex-unknown-cannot-choose"),
    ],
)
def test_it_chooses_the_total_body_water_fraction_by_age_and_sex(months, sex, fraction):
    assert fluids.total_body_water_fraction(months, sex) == fraction


def test_the_infant_water_fraction_is_marked_as_a_modelling_choice():
    # §13 (S33): 0.7-0.8 for young infants is "a modelling choice, not a guideline number".
    row = fluids.total_body_water_row(3)
    assert row["fraction"] == 0.7
    assert row["status"] == "unconfirmed"
    assert fluids.free_water_deficit_l(5, 154, None, 3) == pytest.approx(0.35)


def test_the_sodium_may_fall_10_to_12_mmol_in_24_hours():
    # N12 S31 (C18): from 160 mmol/L, not below 148-150 mmol/L after 24 h.
    assert fluids.sodium_floor_after_24h(160) == (148, 150)


@given(light=st.floats(0, 150), extra=st.floats(0, 50), above_20=st.sampled_from([20, 25]))
def test_maintenance_never_falls_as_weight_rises(light, extra, above_20):
    heavy = light + extra
    assert 0 <= fluids.maintenance_daily_ml(light, above_20) <= fluids.maintenance_daily_ml(heavy, above_20)
    assert 0 <= fluids.maintenance_hourly_421_ml(light) <= fluids.maintenance_hourly_421_ml(heavy)


@pytest.mark.parametrize("edge", [10, 20])
def test_maintenance_is_continuous_at_the_band_edges(edge):
    # S26 bands: the next band starts where the previous one ends.
    for fn in (fluids.maintenance_daily_ml, fluids.maintenance_hourly_421_ml):
        assert fn(edge + 1e-9) == pytest.approx(fn(edge), abs=1e-6)
