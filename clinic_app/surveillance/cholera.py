"""GTFCC cholera alert rules for an area without a declared outbreak (source S27, rules.py).

Two rules, applied to case-level facts (weekly tallies cannot do this):

- ``cluster``: two or more people aged 2 years or older with acute watery diarrhoea (AWD)
  and severe dehydration, or who died from AWD, in the same area within 7 days of one
  another.
- ``death``: one death from AWD in a person aged 5 years or older.

Our reading of "within 7 days of one another": two qualifying cases whose calendar dates are
at most 7 days apart (the more sensitive reading, as suits an alert). Qualifying cases are
chained: a case within 7 days of any case already in a cluster joins it, so a growing
outbreak stays one alert, keyed by its first case.

Whether a case is AWD (acute, non-bloody) and whether its dehydration is severe are decided
by the clinical core; this module receives them as booleans.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Iterable
from dataclasses import dataclass
from datetime import date

from .rules import (
    CHOLERA_CLUSTER_MIN_CASES,
    CHOLERA_CLUSTER_WINDOW_DAYS,
    CHOLERA_DEATH_MIN_AGE_MONTHS,
    CHOLERA_SUSPECT_MIN_AGE_MONTHS,
)


@dataclass(frozen=True)
class CaseFact:
    """What the cholera rules need to know about one case."""

    case_id: str
    area: str
    day: date
    age_months: float
    awd: bool
    severe: bool
    died: bool


@dataclass(frozen=True)
class CholeraAlert:
    """One alert: the rule that fired, its area, the cases behind it and their date span."""

    rule: str  # "cluster" | "death"
    area: str
    case_ids: tuple[str, ...]
    first_day: date
    last_day: date

    @property
    def key(self) -> str:
        """A stable identity for storage: the rule, area and first case."""
        return f"cholera:{self.rule}:{self.area}:{self.case_ids[0]}"


def is_suspected_case(case: CaseFact) -> bool:
    """S27 suspected case (no outbreak declared): AWD at age >= 2 y with severe dehydration or death."""
    return (
        case.awd
        and case.age_months >= CHOLERA_SUSPECT_MIN_AGE_MONTHS
        and (case.severe or case.died)
    )


def cholera_alerts(cases: Iterable[CaseFact]) -> list[CholeraAlert]:
    """Every alert the two S27 rules raise over the given cases, ordered by first day."""
    cases = list(cases)
    alerts = _death_alerts(cases) + _cluster_alerts(cases)
    return sorted(alerts, key=lambda a: (a.first_day, a.rule, a.area, a.case_ids))


def _death_alerts(cases: list[CaseFact]) -> list[CholeraAlert]:
    return [
        CholeraAlert("death", c.area, (c.case_id,), c.day, c.day)
        for c in cases
        if c.awd and c.died and c.age_months >= CHOLERA_DEATH_MIN_AGE_MONTHS
    ]


def _cluster_alerts(cases: list[CaseFact]) -> list[CholeraAlert]:
    by_area: dict[str, list[CaseFact]] = defaultdict(list)
    for case in cases:
        if is_suspected_case(case):
            by_area[case.area].append(case)
    alerts = []
    for area, members in by_area.items():
        members.sort(key=lambda c: (c.day, c.case_id))
        chain = [members[0]]
        for case in members[1:]:
            if (case.day - chain[-1].day).days <= CHOLERA_CLUSTER_WINDOW_DAYS:
                chain.append(case)
            else:
                alerts.extend(_chain_alert(area, chain))
                chain = [case]
        alerts.extend(_chain_alert(area, chain))
    return alerts


def _chain_alert(area: str, chain: list[CaseFact]) -> list[CholeraAlert]:
    if len(chain) < CHOLERA_CLUSTER_MIN_CASES:
        return []
    ids = tuple(c.case_id for c in chain)
    return [CholeraAlert("cluster", area, ids, chain[0].day, chain[-1].day)]
