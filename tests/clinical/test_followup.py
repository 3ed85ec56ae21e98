"""Follow-up logic: due times by plan, the next plan after a reassessment, follow-up days.

Sources are named per row (ids from the reference source register); the clock is a parameter.
"""

from __future__ import annotations

from datetime import UTC, date, datetime, timedelta

import pytest

from clinic_app.clinical import followup
from clinic_app.clinical.assess import assess
from clinic_app.clinical.types import ClinicSettings

START = datetime(2026, 3, 2, 8, 0, tzinfo=UTC)
SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
NONE = {"condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"}
SEVERE = {"condition": "lethargic", "eyes": "sunken", "drinking": "poor",
          "skin_pinch": "very_slow"}


def result(signs, age=18, weight=10.0, **extra):
    context = extra.pop("context", {})
    return assess({"age_months": age, "weight_kg": weight, "signs": signs, "context": context,
                   **extra}, ClinicSettings())


IV = {"iv_available": True}
NG = {"iv_available": False, "ng_trained": True}


@pytest.mark.parametrize("signs, age, context, extra, kind, reassess_h, checks, escalate_h", [
    pytest.param(SOME, 18, {}, {}, "plan_b", 4, None, None,
                 id="S02/S04 Plan B: reassess after 4 hours"),
    pytest.param(SEVERE, 8, IV, {}, "plan_c_iv", 6, [15, 30], None,
                 id="S02 Plan C IV infant under 12 months: checks 15-30 min, reassess at 6 h"),
    pytest.param(SEVERE, 12, IV, {}, "plan_c_iv", 3, [15, 30], None,
                 id="S02 Plan C IV from 12 months: checks 15-30 min, reassess at 3 h"),
    pytest.param(SEVERE, 30, NG, {}, "plan_c_ng", 6, [60, 120], 3,
                 id="S04 from memory NG: checks 1-2 h, IV if not improving at 3 h; S14 6 h"),
    pytest.param(NONE, 18, {}, {"muac_mm": 100}, "sam", 12, [30, 30], None,
                 id="S08 SAM: every 30 min for the first 2 h (check times from memory), 12 h max"),
    pytest.param(NONE, 18, {}, {}, "none", None, None, None, id="Plan A: nothing in clinic"),
])
def test_it_schedules_each_plan(signs, age, context, extra, kind, reassess_h, checks,
                                escalate_h):
    plan = followup.schedule(result(signs, age, context=context, **extra), age, START)
    assert plan["kind"] == kind
    assert plan["reassess_at"] == (None if reassess_h is None
                                   else START + timedelta(hours=reassess_h))
    assert plan["check_minutes"] == checks
    assert plan["escalate_at"] == (None if escalate_h is None
                                   else START + timedelta(hours=escalate_h))


def test_a_referred_plan_c_case_has_no_clinic_schedule():
    # S04 chain: no IV, no NG training, IV facility far -> refer, nothing to monitor here.
    assert followup.schedule(result(SEVERE, 30), 30, START)["kind"] == "none"


def test_sam_rehydration_stops_at_its_12_hour_maximum():
    # S08: "5-10 ml/kg per h up to a maximum of 12 hours"
    plan = followup.schedule(result(NONE, muac_mm=100), 18, START)
    assert plan["ends_at"] == START + timedelta(hours=12)


@pytest.mark.parametrize("minutes_after, due", [(239, False), (240, True), (300, True)])
def test_plan_b_reassessment_falls_due_at_4_hours(minutes_after, due):
    # S02: "after four hours, reassess the child fully"
    items = followup.due_items(result(SOME), 18, START, None, False,
                               START + timedelta(minutes=minutes_after))
    assert [(i["kind"], i["due"]) for i in items] == [("reassess", due)]


def test_iv_checks_fall_due_15_minutes_after_the_last_and_late_after_30():
    # S02: "assess patients every 15-30 minutes until a strong radial pulse is present"
    last = START + timedelta(minutes=40)
    items = followup.due_items(result(SEVERE, 30, context=IV), 30, START, last, False,
                               last + timedelta(minutes=20))
    check = items[0]
    assert check["kind"] == "check" and check["due_at"] == last + timedelta(minutes=15)
    assert check["due"] and not check["late"]
    later = followup.due_items(result(SEVERE, 30, context=IV), 30, START, last, False,
                               last + timedelta(minutes=31))
    assert later[0]["late"]


def test_sam_checks_become_hourly_after_the_first_two_hours():
    # S08 dosing times (every 30 min for 2 h, then hourly); used as check times from memory.
    last = START + timedelta(hours=2, minutes=10)
    items = followup.due_items(result(NONE, muac_mm=100), 18, START, last, False, last)
    assert items[0]["due_at"] == last + timedelta(minutes=60)


def test_nothing_is_due_once_the_reassessment_is_done():
    assert followup.due_items(result(SOME), 18, START, None, True,
                              START + timedelta(hours=9)) == []


@pytest.mark.parametrize("before, before_ctx, after, transition, improved", [
    pytest.param(SOME, {}, NONE, "B_to_A", True, id="S02 Plan B, no dehydration now -> Plan A"),
    pytest.param(SOME, {}, SOME, "B_repeat", False, id="S02 still some -> repeat Plan B"),
    pytest.param(SOME, {}, SEVERE, "B_to_C", False, id="S02 severe appeared -> Plan C"),
    pytest.param(SEVERE, IV, SOME, "C_to_B", True, id="S02 after IV, some -> Plan B"),
    pytest.param(SEVERE, IV, NONE, "C_to_A", True, id="S02 after IV, none -> Plan A"),
    pytest.param(SEVERE, IV, SEVERE, "C_repeat", False, id="S02 still severe -> repeat IV"),
])
def test_it_names_the_next_plan_from_the_new_signs(before, before_ctx, after, transition,
                                                   improved):
    prev = result(before, 30, context=before_ctx)
    new = result(after, 30, context=before_ctx)
    step = followup.reassessment(prev, new, START, START + timedelta(hours=4))
    assert step["transition"] == transition
    assert step["improved"] is improved
    assert step["send_for_iv"] is False


def test_plan_b_to_a_gives_the_per_stool_amounts_for_the_age():
    # S03 WHO 2005 Plan A: under 2 years 50-100 ml after each loose stool.
    new = result(NONE, 18)
    step = followup.reassessment(result(SOME, 18), new, START, START + timedelta(hours=4))
    assert step["to_plan"] == "A"
    assert new["per_stool_ml"] == {"low_ml": 50, "high_ml": 100}
    texts = followup.next_step_texts(step)
    assert texts == ["No dehydration now: change to Plan A and teach the mother home treatment."]


@pytest.mark.parametrize("hours, after, send", [
    pytest.param(2.5, SEVERE, False, id="S04 from memory: before 3 h, keep going"),
    pytest.param(3, SEVERE, True, id="S04 from memory: not improving at 3 h -> IV"),
    pytest.param(3, SOME, False, id="improving at 3 h -> no IV"),
])
def test_nasogastric_rehydration_not_improving_after_3_hours_sends_for_iv(hours, after, send):
    prev = result(SEVERE, 30, context=NG)
    step = followup.reassessment(prev, result(after, 30, context=NG), START,
                                 START + timedelta(hours=hours))
    assert step["send_for_iv"] is send
    assert any("send the child for IV" in t for t in followup.next_step_texts(step)) is send


VISIT = date(2026, 3, 2)


@pytest.mark.parametrize("classifications, improving, days", [
    pytest.param(["some_dehydration", "dysentery"], None, 2, id="S07 dysentery: 2 days"),
    pytest.param(["no_dehydration", "persistent_diarrhoea"], None, 5,
                 id="S04 persistent diarrhoea: 5 days"),
    pytest.param(["no_dehydration", "persistent_diarrhoea", "dysentery"], None, 2,
                 id="S07/S04 the earlier visit wins"),
    pytest.param(["no_dehydration"], False, 5, id="S04 from memory: Plan A not improving, 5 days"),
    pytest.param(["no_dehydration"], True, None, id="Plan A improving: no visit"),
    pytest.param(["some_dehydration"], None, None, id="no row applies"),
])
def test_it_schedules_the_follow_up_visit_from_the_classification(classifications, improving,
                                                                  days):
    visit = followup.followup_visit(classifications, VISIT, improving=improving)
    if days is None:
        assert visit is None
    else:
        assert visit["days"] == days
        assert visit["date"] == VISIT + timedelta(days=days)
