"""Fluid balance: a hand-worked example with its arithmetic, and the warnings."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

from clinic_app.clinical import monitoring
from clinic_app.clinical.assess import assess
from clinic_app.clinical.types import ClinicSettings

START = datetime(2026, 3, 2, 9, 0, tzinfo=UTC)
SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
PLAN_B_10KG = assess({"age_months": 18, "weight_kg": 10, "signs": SOME}, ClinicSettings())


def at(minutes):
    return START + timedelta(minutes=minutes)


def intake(minutes, ml=None, cups=None, what="ors"):
    return {"at": at(minutes), "kind": "intake", "what": what, "ml": ml, "cups": cups}


def output(minutes, what, ml=None):
    return {"at": at(minutes), "kind": "output", "what": what, "ml": ml}


EXAMPLE = [
    intake(0, cups=2),          # 2 cups x 200 ml = 400 ml
    output(30, "stool"),
    intake(60, ml=150),         # 150 ml
    output(80, "stool"),
    output(90, "vomit", ml=40),
    intake(120, cups=0.5),      # 0.5 cup x 200 ml = 100 ml
    output(150, "urine", ml=60),
]


def test_hand_worked_plan_b_balance_matches_its_arithmetic():
    # 18-month-old, 10 kg, some dehydration.
    # Plan volume: 75 ml/kg x 10 kg = 750 ml (S04 IMCI Plan B rule).
    # Per stool under 2 years: 50-100 ml (S03 WHO 2005 Plan A); 2 stools recorded.
    # Target: 750 + 2 x 50 = 850 ml (low) ... 750 + 2 x 100 = 950 ml (high).
    # Given: 400 + 150 + 100 = 650 ml (cup of 200 ml, the clinic's setting).
    # Remaining: 850 - 650 = 200 ml ... 950 - 650 = 300 ml.
    # Measured losses: vomit 40 + urine 60 = 100 ml.
    balance = monitoring.fluid_balance(PLAN_B_10KG, 18, EXAMPLE, cup_ml=200)
    assert balance["plan_volume_ml"] == 750
    assert (balance["target_low"], balance["target_high"]) == (850, 950)
    assert balance["given_ml"] == 650
    assert (balance["remaining_low"], balance["remaining_high"]) == (200, 300)
    assert balance["losses_ml"] == 100
    assert balance["counts"] == {"stool": 2, "vomit": 1, "urine": 1}
    assert balance["warnings"] == []


def test_the_series_steps_the_target_up_at_each_stool():
    series = monitoring.fluid_balance(PLAN_B_10KG, 18, EXAMPLE, cup_ml=200)["series"]
    assert [p["target_low"] for p in series] == [750, 800, 800, 850, 850, 850, 850]
    assert [p["given_ml"] for p in series] == [400, 400, 550, 550, 550, 650, 650]


def test_the_clinic_cup_size_changes_the_volume_of_counted_cups():
    balance = monitoring.fluid_balance(PLAN_B_10KG, 18, [intake(0, cups=2)], cup_ml=250)
    assert balance["given_ml"] == 500  # 2 x 250 ml


def test_remaining_never_goes_below_zero():
    balance = monitoring.fluid_balance(PLAN_B_10KG, 18, [intake(0, ml=1000)], cup_ml=200)
    assert (balance["remaining_low"], balance["remaining_high"]) == (0, 0)


def test_it_warns_when_far_more_than_the_plan_was_given():
    # Common practice, no source: "far" = more than 1.5 x the upper target.
    # No stools: upper target 750 ml; 1.5 x 750 = 1125 ml.
    near = monitoring.fluid_balance(PLAN_B_10KG, 18, [intake(0, ml=1125)], cup_ml=200)
    far = monitoring.fluid_balance(PLAN_B_10KG, 18, [intake(0, ml=1130)], cup_ml=200)
    assert "far_beyond_plan" not in near["warnings"]
    assert "far_beyond_plan" in far["warnings"]


def test_puffy_eyelids_and_not_improving_come_first():
    balance = monitoring.fluid_balance(PLAN_B_10KG, 18, [intake(0, ml=2000)], cup_ml=200,
                                       puffy_eyelids=True, not_improving=True)
    assert balance["warnings"] == ["puffy_eyelids", "not_improving", "far_beyond_plan"]


def test_plan_a_has_only_the_per_stool_target():
    plan_a = assess({"age_months": 36, "weight_kg": 14, "signs": {
        "condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"}},
        ClinicSettings())
    # S03 WHO 2005: 2 up to 10 years, 100-200 ml per loose stool; 3 stools -> 300-600 ml.
    balance = monitoring.fluid_balance(plan_a, 36, [output(m, "stool") for m in (0, 60, 120)],
                                       cup_ml=200)
    assert (balance["target_low"], balance["target_high"]) == (300, 600)
