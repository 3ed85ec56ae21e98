"""Quality indicators from issue 7, as shares with numerator and denominator.

The Plan B window is 4 h +/- 1 h: 4 h from S02 ("after four hours, reassess"), the tolerance
from issue 7.
"""

from datetime import date, datetime, timedelta

import pytest

from clinic_app.surveillance.quality import (
    QualityCase,
    follow_ups_on_time,
    ors_given,
    plan_b_reassessed_on_time,
    quality_indicators,
    severe_referred_or_plan_c,
    zinc_given,
)

START = datetime(2026, 12, 29, 9, 0)


def qc(severity="some", plan="B", **kw):
    return QualityCase(severity=severity, plan=plan, created_at=START, **kw)


def test_ors_share_counts_only_some_and_severe_cases():
    cases = [qc(ors_sachets=2), qc("severe", "C"), qc("none", "A", ors_sachets=4)]
    result = ors_given(cases)
    assert (result.numerator, result.denominator, result.share) == (1, 2, 0.5)


def test_zinc_share_counts_cases_for_which_zinc_was_advised():
    cases = [qc(zinc_advised=True, zinc_tablets=10), qc(zinc_advised=True), qc(zinc_tablets=5)]
    assert (zinc_given(cases).numerator, zinc_given(cases).denominator) == (1, 2)


def test_severe_cases_count_as_handled_when_referred_or_on_plan_c():
    cases = [qc("severe", "C"), qc("severe", "B", referral_made=True), qc("severe", "B")]
    result = severe_referred_or_plan_c(cases)
    assert (result.numerator, result.denominator) == (2, 3)


@pytest.mark.parametrize(
    "hours, on_time",
    [(2.9, False), (3.0, True), (4.0, True), (5.0, True), (5.1, False), (None, False)],
)
def test_plan_b_reassessment_counts_between_3_and_5_hours(hours, on_time):  # S02 + issue 7
    when = None if hours is None else START + timedelta(hours=hours)
    result = plan_b_reassessed_on_time([qc(reassessed_at=when), qc("severe", "C")])
    assert (result.numerator, result.denominator) == (int(on_time), 1)


def test_follow_ups_count_when_due_by_today_and_done_by_the_due_date():
    today = date(2027, 1, 5)
    cases = [
        qc(follow_up_due=date(2027, 1, 2), follow_up_done=date(2027, 1, 2)),
        qc(follow_up_due=date(2027, 1, 2), follow_up_done=date(2027, 1, 3)),
        qc(follow_up_due=date(2027, 1, 4)),
        qc(follow_up_due=date(2027, 1, 9)),  # not yet due
        qc(),
    ]
    result = follow_ups_on_time(cases, today)
    assert (result.numerator, result.denominator) == (1, 3)


def test_an_empty_denominator_gives_no_share_rather_than_zero():
    assert all(i.share is None for i in quality_indicators([], date(2027, 1, 1)))


def test_all_five_indicators_come_in_the_issue_order():
    keys = [i.key for i in quality_indicators([qc()], date(2027, 1, 1))]
    assert keys == [
        "ors_given",
        "zinc_given",
        "severe_referred_or_plan_c",
        "plan_b_reassessed_on_time",
        "follow_ups_on_time",
    ]
