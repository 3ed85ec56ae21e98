"""Plans A, B, C, SAM and zinc: amounts and every band boundary of reference section 16."""

from __future__ import annotations

import pytest

from tests.clinical.core_inputs import SEVERE, SOME, WELL, case, codes, run

# --- Plan A (S03 CDC reproduction of WHO 2005; WHO age split, conflict C3) ---------------------


@pytest.mark.parametrize(("age", "per_stool", "home"), [
    pytest.param(2, {"low_ml": 50, "high_ml": 100}, 500, id="S03-PlanA-under-2y"),
    pytest.param(23.99, {"low_ml": 50, "high_ml": 100}, 500, id="S03-PlanA-23.99-months"),
    pytest.param(24, {"low_ml": 100, "high_ml": 200}, 1000, id="S03-PlanA-24-months"),
    pytest.param(119.99, {"low_ml": 100, "high_ml": 200}, 1000, id="S03-PlanA-under-10y"),
    pytest.param(120, {"as_much_as_wanted": True}, 2000, id="S03-PlanA-10y-as-much-as-wanted"),
    pytest.param(480, {"as_much_as_wanted": True}, 2000, id="S03-PlanA-adult"),
])
def test_plan_a_amounts_by_age(age, per_stool, home):
    result = run(case(age=age))
    assert result["plan"] == "A"
    assert result["per_stool_ml"] == per_stool
    assert result["home_ors_ml_per_day"] == home
    assert result["ors"] is None and result["iv"] is None


# --- Plan B tables -----------------------------------------------------------------------------


@pytest.mark.parametrize(("weight", "age", "low", "high"), [
    pytest.param(4.99, 3, 200, 400, id="S03-WHO2005-PlanB-<5kg"),
    pytest.param(5, 3, 400, 600, id="S03-WHO2005-PlanB-5kg"),
    pytest.param(7.95, 9, 400, 600, id="S03-WHO2005-PlanB-7.95kg-gap-closed"),
    pytest.param(8, 9, 600, 800, id="S03-WHO2005-PlanB-8kg"),
    pytest.param(10.95, 18, 600, 800, id="S03-WHO2005-PlanB-10.95kg"),
    pytest.param(11, 18, 800, 1200, id="S03-WHO2005-PlanB-11kg"),
    pytest.param(15.95, 40, 800, 1200, id="S03-WHO2005-PlanB-15.95kg"),
    pytest.param(16, 40, 1200, 2200, id="S03-WHO2005-PlanB-16kg"),
    pytest.param(29.95, 120, 1200, 2200, id="S03-WHO2005-PlanB-29.95kg"),
    pytest.param(30, 120, 2200, 4000, id="S03-WHO2005-PlanB-30kg"),
    pytest.param(70, 480, 2200, 4000, id="S03-WHO2005-PlanB-70kg-adult"),
])
def test_who2005_plan_b_row_by_weight(weight, age, low, high):
    ors = run(case(age=age, weight=weight, signs=SOME))["ors"]
    assert (ors["low_ml"], ors["high_ml"], ors["basis"], ors["hours"]) == (low, high, "weight", 4)


@pytest.mark.parametrize(("age", "low", "high"), [
    pytest.param(3.99, 200, 400, id="S03-WHO2005-PlanB-age-<4m"),
    pytest.param(4, 400, 600, id="S03-WHO2005-PlanB-age-4m"),
    pytest.param(11.99, 400, 600, id="S03-WHO2005-PlanB-age-11.99m"),
    pytest.param(12, 600, 800, id="S03-WHO2005-PlanB-age-12m"),
    pytest.param(23.99, 600, 800, id="S03-WHO2005-PlanB-age-23.99m"),
    pytest.param(24, 800, 1200, id="S03-WHO2005-PlanB-age-2y"),
    pytest.param(59.99, 800, 1200, id="S03-WHO2005-PlanB-age-59.99m"),
    pytest.param(60, 1200, 2200, id="S03-WHO2005-PlanB-age-5y"),
    pytest.param(179.99, 1200, 2200, id="S03-WHO2005-PlanB-age-14y"),
    pytest.param(180, 2200, 4000, id="S03-WHO2005-PlanB-age-15y"),
])
def test_who2005_plan_b_row_by_age_when_no_weight(age, low, high):
    ors = run(case(age=age, signs=SOME))["ors"]
    assert (ors["low_ml"], ors["high_ml"], ors["basis"], ors["total_ml"]) == (low, high, "age", None)
    # PRACTICE: without a weight the hourly schedule splits the table's lower figure over 4 h.
    assert ors["hourly_ml"] == [low // 4] * 4


@pytest.mark.parametrize(("weight", "age", "low", "high"), [
    pytest.param(5.99, 3, 200, 400, id="S04-IMCI-PlanB-<6kg"),
    pytest.param(6, 5, 400, 700, id="S04-IMCI-PlanB-6kg"),
    pytest.param(9.99, 10, 400, 700, id="S04-IMCI-PlanB-9.99kg"),
    pytest.param(10, 14, 700, 900, id="S04-IMCI-PlanB-10kg"),
    pytest.param(11.99, 20, 700, 900, id="S04-IMCI-PlanB-11.99kg"),
    pytest.param(12, 30, 900, 1400, id="S04-IMCI-PlanB-12kg"),
    pytest.param(18.99, 50, 900, 1400, id="S04-IMCI-PlanB-18.99kg"),
    pytest.param(19, 55, None, None, id="S04-IMCI-PlanB-19kg-gap-uses-75ml/kg"),
    pytest.param(19.5, 55, None, None, id="S04-IMCI-PlanB-19.5kg-gap"),
    pytest.param(20, 58, None, None, id="S04-IMCI-PlanB-20kg-beyond-table"),
])
def test_imci_plan_b_row_by_weight(weight, age, low, high):
    result = run(case(age=age, weight=weight, signs=SOME), plan_b_table="imci")
    ors = result["ors"]
    assert (ors["low_ml"], ors["high_ml"], ors["table"]) == (low, high, "imci")
    # S04: 75 ml/kg is always shown when the weight is known (rounded half-up to 5 ml).
    assert abs(ors["total_ml"] - 75 * weight) <= 2.5
    if low is None:
        assert "plan_b_no_table_row" in codes(result["cautions"])
        assert "plan_b_weight_no_row" in codes(result["actions"])


@pytest.mark.parametrize(("age", "low", "high"), [
    pytest.param(3.99, 200, 400, id="S04-IMCI-PlanB-age-up-to-4m"),
    pytest.param(4, 400, 700, id="S04-IMCI-PlanB-age-4m"),
    pytest.param(11.99, 400, 700, id="S04-IMCI-PlanB-age-11.99m"),
    pytest.param(12, 700, 900, id="S04-IMCI-PlanB-age-12m"),
    pytest.param(23.99, 700, 900, id="S04-IMCI-PlanB-age-23.99m"),
    pytest.param(24, 900, 1400, id="S04-IMCI-PlanB-age-2y"),
    pytest.param(59.99, 900, 1400, id="S04-IMCI-PlanB-age-59.99m"),
    pytest.param(60, None, None, id="S04-IMCI-PlanB-age-5y-outside-table"),
])
def test_imci_plan_b_row_by_age(age, low, high):
    result = run(case(age=age, signs=SOME), plan_b_table="imci")
    ors = result["ors"]
    assert (ors["low_ml"], ors["high_ml"], ors["total_ml"]) == (low, high, None)
    if low is None:
        assert ors["hourly_ml"] == []
        assert "plan_b_no_volume" in codes(result["actions"])


@pytest.mark.parametrize(("weight", "total", "hourly"), [
    pytest.param(12, 900, 225, id="S04-N14-12kg-900ml-225ml/h"),
    pytest.param(7.3, 550, 135, id="S04-7.3kg-547.5-rounds-half-up-to-550"),
    pytest.param(7.1, 535, 135, id="S04-7.1kg-532.5-rounds-half-up-to-535"),
    pytest.param(6.97, 525, 130, id="S04-6.97kg-522.75-to-525"),
    pytest.param(4, 300, 75, id="S04-4kg-300ml"),
])
def test_plan_b_total_is_75_ml_per_kg_rounded_to_5_ml(weight, total, hourly):
    ors = run(case(age=10 if weight < 8 else 30, weight=weight, signs=SOME))["ors"]
    assert ors["total_ml"] == total
    assert ors["hourly_ml"] == [hourly] * 4


def test_plan_b_above_the_table_says_give_more():
    # S03 / conflict C2: 70 kg x 75 = 5250 ml, more than the 2200-4000 row.
    result = run(case(age=480, weight=70, signs=SOME))
    assert result["ors"]["total_ml"] == 5250
    assert "plan_b_above_table" in codes(result["cautions"])


# --- Plan C ---------------------------------------------------------------------------------------


@pytest.mark.parametrize(("age", "weight", "steps"), [
    pytest.param(11.99, 8, [(240, 60), (560, 300)], id="S02-PlanC-IV-under-12m-1h-then-5h"),
    pytest.param(12, 10, [(300, 30), (700, 150)], id="S02-PlanC-IV-12m-30min-then-2.5h"),
    pytest.param(1, 4, [(120, 60), (280, 300)], id="S02-PlanC-IV-young-infant-schedule"),
    pytest.param(480, 60, [(1800, 30), (4200, 150)], id="S02-PlanC-IV-adult"),
])
def test_plan_c_iv_schedule_by_age(age, weight, steps):
    signs = SEVERE if age >= 2 else {"condition": "restless", "eyes": "sunken", "skin_pinch": "very_slow"}
    result = run(case(age=age, weight=weight, signs=signs), iv_available=True)
    assert result["plan"] == "C"
    assert [(s["ml"], s["minutes"]) for s in result["iv"]["steps"]] == steps
    assert result["ng"] is None


@pytest.mark.parametrize(("settings", "route", "refer"), [
    pytest.param({"iv_available": True, "minutes_to_iv_facility": 5}, "iv", "none", id="S04-chain-1-IV-here"),
    pytest.param({"minutes_to_iv_facility": 29, "ng_trained": True}, "refer_iv_facility", "urgent",
                 id="S04-chain-2-IV-facility-under-30-min"),
    pytest.param({"minutes_to_iv_facility": 30, "ng_trained": True}, "ng", "none",
                 id="S04-chain-3-30-min-is-not-less-than-30-NG"),
    pytest.param({"ng_trained": True}, "ng", "none", id="S14-chain-3-NG"),
    pytest.param({"minutes_to_iv_facility": 45}, "refer", "urgent", id="S04-chain-4-refer-urgently"),
    pytest.param({}, "refer", "urgent", id="S04-chain-4-nothing-available"),
])
def test_plan_c_decision_chain(settings, route, refer):
    result = run(case(age=30, weight=10, signs=SEVERE), **settings)
    assert result["refer"] == refer
    assert (result["iv"] is not None) is (route == "iv")
    assert (result["ng"] is not None) is (route == "ng")
    if route in ("refer_iv_facility", "refer"):
        assert "plan_c_" + route in codes(result["actions"])
        assert "sips" in " ".join(a["text"] for a in result["actions"])


def test_nasogastric_ors_is_20_ml_per_kg_per_hour_for_6_hours():
    # S14: 20 ml/kg/hour over 6 hours (i.e. 120 ml/kg).
    result = run(case(age=30, weight=10, signs=SEVERE), ng_trained=True)
    assert result["ng"] == {"ml_per_hour": 200, "hours": 6, "total_ml": 1200, "ml_per_kg_per_hour": 20}


def test_context_overrides_the_clinic_settings():
    inputs = case(age=30, weight=10, signs=SEVERE, context={"iv_available": False, "ng_trained": True})
    result = run(inputs, iv_available=True)
    assert result["iv"] is None and result["ng"]["ml_per_hour"] == 200
    assert result["context"]["iv_available"] is False


def test_plan_c_without_weight_uses_the_updated_apls_estimate_labelled_estimated():
    # S29 updated APLS: 30 months = 2.5 y -> 2 x 2.5 + 8 = 13 kg; NG 20 ml/kg/h -> 260 ml/h.
    result = run(case(age=30, signs=SEVERE), ng_trained=True)
    assert result["weight"] == {"kg": 13, "estimated": True, "basis": "apls_updated",
                                "formula": "2 x age in years + 8"}
    assert result["ng"]["ml_per_hour"] == 260 and result["ng"]["total_ml"] == 1560
    assert "weight_from_age" in codes(result["cautions"])


def test_plan_b_never_uses_the_age_formula():
    result = run(case(age=30, signs=SOME))
    assert result["ors"]["basis"] == "age" and result["ors"]["total_ml"] is None


# --- SAM --------------------------------------------------------------------------------------


def test_sam_rehydration_schedule_for_8_kg():
    # S08 / N15: 5 ml/kg every 30 min for 2 h = 40 ml; then 5-10 ml/kg/h = 40-80 ml/h; max 12 h.
    result = run(case(age=18, weight=8, muac_mm=110, signs=SOME))
    assert result["plan"] == "SAM" and result["refer"] == "urgent"
    sam = result["sam_rehydration"]
    assert (sam["first_2h_ml_every_30_min"], sam["then_ml_per_hour_low"],
            sam["then_ml_per_hour_high"], sam["max_hours"]) == (40, 40, 80, 12)
    assert result["ors"] is None and result["iv"] is None and result["ng"] is None
    assert result["home_ors_ml_per_day"] == 0  # S08: standard ORS unsuitable in SAM


def test_sam_with_shock_gets_iv_15_ml_per_kg_over_1_hour():
    # S20: IV fluid at 15 ml/kg over 1 hour, only in shock.
    result = run(case(age=18, weight=8, muac_mm=110, signs=SEVERE, danger_signs={"shock": True}),
                 iv_available=True)
    assert result["iv"]["steps"] == [{"ml": 120, "ml_per_kg": 15, "minutes": 60}]
    assert result["plan"] == "SAM"


def test_sam_never_uses_an_estimated_weight():
    for extra in ({}, {"weight_kg": 8, "weight_estimated": True}):
        result = run(case(age=18, muac_mm=110, signs=SOME, **extra))
        assert result["weight"] is None
        assert result["sam_rehydration"]["first_2h_ml_every_30_min"] is None
        assert "sam_no_estimated_weight" in codes(result["cautions"])
        assert "sam_resomal_per_kg" in codes(result["actions"])


def test_sam_without_signs_of_dehydration_still_uses_the_sam_protocol():
    # S08: in SAM, assume children with watery diarrhoea have some dehydration.
    result = run(case(age=18, weight=8, muac_mm=110, signs=WELL))
    assert result["plan"] == "SAM" and result["severity"] == "none"


# --- Zinc -------------------------------------------------------------------------------------


@pytest.mark.parametrize(("age", "mg"), [
    pytest.param(1.99, None, id="S07-zinc-none-under-2-months"),
    pytest.param(2, 10, id="S04-zinc-10mg-from-2-months"),
    pytest.param(5.99, 10, id="S04-zinc-10mg-under-6-months"),
    pytest.param(6, 20, id="S04-C5-zinc-20mg-at-exactly-6-months"),
    pytest.param(59.99, 20, id="S04-zinc-20mg-under-5-years"),
    pytest.param(60, None, id="S04-zinc-IMCI-scope-ends-at-5-years"),
])
def test_zinc_dose_by_age(age, mg):
    signs = WELL if age >= 2 else {"condition": "well", "eyes": "normal", "skin_pinch": "quick"}
    zinc = run(case(age=age, signs=signs))["zinc"]
    assert (zinc and zinc["mg_per_day"]) == mg
    if zinc:
        assert (zinc["days_min"], zinc["days_max"]) == (10, 14)  # S15: 10-14 days


@pytest.mark.parametrize(("upper", "age", "mg"), [
    pytest.param(180, 60, 20, id="ref-s5-field-guide-up-to-15-years-5y-gets-20mg"),
    pytest.param(180, 179.99, 20, id="ref-s5-field-guide-up-to-15-years-just-under"),
    pytest.param(180, 180, None, id="ref-s5-field-guide-up-to-15-years-none-at-15"),
    pytest.param(None, 600, 20, id="ref-s5-WHO-2005-children-no-fixed-limit"),
    pytest.param(24, 23.99, 20, id="ref-s5-a-stricter-clinic-limit-just-under"),
    pytest.param(24, 24, None, id="ref-s5-a-stricter-clinic-limit-at-the-edge"),
])
def test_the_upper_age_of_zinc_is_a_clinic_setting(upper, age, mg):
    # Reference section 5: the upper age is not fixed (IMCI under 5, S04; WHO 2005 "children";
    # a field guide up to 15 years); the dose itself stays S04/S10.
    zinc = run(case(age=age), zinc_max_age_months=upper)["zinc"]
    assert (zinc and zinc["mg_per_day"]) == mg


def test_zinc_days_come_from_the_settings():
    # C4: IMCI (Ethiopian) 10 days.
    result = run(case(age=30), zinc_days_min=10, zinc_days_max=10)
    assert result["zinc"] == {"mg_per_day": 20, "days_min": 10, "days_max": 10}
    assert "zinc_fixed_days" in codes(result["actions"])
