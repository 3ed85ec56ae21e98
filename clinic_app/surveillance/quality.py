"""Quality-of-care indicators as pure functions over case facts (definitions: issue 7).

Each indicator is a share with its numerator and denominator; the share is None when no case
is in the denominator, so an empty week never reads as 0 % or 100 %.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from datetime import date, datetime

from .rules import QI_REASSESS_AFTER_HOURS, QI_REASSESS_TOLERANCE_HOURS


@dataclass(frozen=True)
class QualityCase:
    """The facts about one case that the indicators read.

    ``severity`` is "none", "some" or "severe"; ``plan`` is "A", "B" or "C" (or None).
    ``zinc_advised`` says whether the assessment result recommended zinc.
    ``reassessed_at`` is the first reassessment time; ``follow_up_due``/``follow_up_done``
    are calendar dates (None when no follow-up was due or none was done).
    """

    severity: str
    plan: str | None
    created_at: datetime
    ors_sachets: int = 0
    zinc_tablets: int = 0
    zinc_advised: bool = False
    referral_made: bool = False
    reassessed_at: datetime | None = None
    follow_up_due: date | None = None
    follow_up_done: date | None = None


@dataclass(frozen=True)
class Indicator:
    """numerator / denominator, and their share (None when the denominator is 0)."""

    key: str
    numerator: int
    denominator: int

    @property
    def share(self) -> float | None:
        return self.numerator / self.denominator if self.denominator else None


def _share(key: str, cases: Iterable[QualityCase], eligible, met) -> Indicator:
    pool = [c for c in cases if eligible(c)]
    return Indicator(key, sum(1 for c in pool if met(c)), len(pool))


def ors_given(cases: Iterable[QualityCase]) -> Indicator:
    """Share of cases with some or severe dehydration that were given ORS."""
    return _share(
        "ors_given", cases, lambda c: c.severity in ("some", "severe"), lambda c: c.ors_sachets > 0
    )


def zinc_given(cases: Iterable[QualityCase]) -> Indicator:
    """Share of cases for which zinc was advised that were given zinc."""
    return _share("zinc_given", cases, lambda c: c.zinc_advised, lambda c: c.zinc_tablets > 0)


def severe_referred_or_plan_c(cases: Iterable[QualityCase]) -> Indicator:
    """Share of severe cases that were referred or treated with Plan C."""
    return _share(
        "severe_referred_or_plan_c",
        cases,
        lambda c: c.severity == "severe",
        lambda c: c.referral_made or c.plan == "C",
    )


def plan_b_reassessed_on_time(cases: Iterable[QualityCase]) -> Indicator:
    """Share of Plan B cases first reassessed between 3 and 5 hours (4 h +/- 1 h) after the start."""
    low = QI_REASSESS_AFTER_HOURS - QI_REASSESS_TOLERANCE_HOURS
    high = QI_REASSESS_AFTER_HOURS + QI_REASSESS_TOLERANCE_HOURS

    def on_time(case: QualityCase) -> bool:
        if case.reassessed_at is None:
            return False
        hours = (case.reassessed_at - case.created_at).total_seconds() / 3600
        return low <= hours <= high

    return _share("plan_b_reassessed_on_time", cases, lambda c: c.plan == "B", on_time)


def follow_ups_on_time(cases: Iterable[QualityCase], today: date) -> Indicator:
    """Share of follow-ups due by ``today`` that were done on or before their due date."""
    return _share(
        "follow_ups_on_time",
        cases,
        lambda c: c.follow_up_due is not None and c.follow_up_due <= today,
        lambda c: c.follow_up_done is not None and c.follow_up_done <= c.follow_up_due,
    )


def quality_indicators(cases: Iterable[QualityCase], today: date) -> list[Indicator]:
    """All five indicators, in the order the issue lists them."""
    cases = list(cases)
    return [
        ors_given(cases),
        zinc_given(cases),
        severe_referred_or_plan_c(cases),
        plan_b_reassessed_on_time(cases),
        follow_ups_on_time(cases, today),
    ]
