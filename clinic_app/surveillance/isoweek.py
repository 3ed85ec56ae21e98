"""ISO 8601 weeks: Monday start, week 1 holds the year's first Thursday.

Some years have 53 weeks (2026 does: 2026-W53 runs from Monday 28 December 2026 to Sunday
3 January 2027). Weeks are written ``YYYY-Www``. The week of a timestamp is the ISO week of
its *local* calendar date as written (a device time ``2026-12-28T00:30+03:00`` is in
2026-W53), because a health worker's week is the one on their own calendar.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from datetime import date, datetime, timedelta

_WEEK_RE = re.compile(r"^(\d{4})-W(\d{2})$")


class WeekError(ValueError):
    """A week string or range that is not valid."""


@dataclass(frozen=True, order=True)
class IsoWeek:
    """One ISO week; ordering follows time."""

    year: int
    week: int

    def __post_init__(self) -> None:
        if not 1 <= self.week <= weeks_in_year(self.year):
            raise WeekError(f"{self.year} has no week {self.week}")

    def __str__(self) -> str:
        return f"{self.year:04d}-W{self.week:02d}"

    @property
    def monday(self) -> date:
        """The first day (Monday) of the week."""
        return date.fromisocalendar(self.year, self.week, 1)

    @property
    def sunday(self) -> date:
        """The last day (Sunday) of the week."""
        return date.fromisocalendar(self.year, self.week, 7)

    def shift(self, weeks: int) -> IsoWeek:
        """The week ``weeks`` later (or earlier when negative)."""
        return week_of(self.monday + timedelta(weeks=weeks))


def weeks_in_year(year: int) -> int:
    """52 or 53: 28 December always lies in the year's last ISO week."""
    if not 1 <= year <= 9998:
        raise WeekError(f"year {year} is out of range")
    return date(year, 12, 28).isocalendar()[1]


def week_of(value: date | datetime | str) -> IsoWeek:
    """The ISO week of a date, a datetime or an ISO 8601 string (local date as written)."""
    if isinstance(value, str):
        value = local_date(value)
    elif isinstance(value, datetime):
        value = value.date()
    iso = value.isocalendar()
    return IsoWeek(iso[0], iso[1])


def local_date(timestamp: str) -> date:
    """The calendar date written at the start of an ISO 8601 timestamp, ignoring its offset."""
    try:
        return date.fromisoformat(timestamp[:10])
    except ValueError as exc:
        raise WeekError(f"not an ISO 8601 date: {timestamp!r}") from exc


def parse_week(text: str) -> IsoWeek:
    """Parse ``YYYY-Www``; raise WeekError for anything else (including 2025-W53)."""
    match = _WEEK_RE.match(text.strip()) if isinstance(text, str) else None
    if not match:
        raise WeekError(f"expected a week like 2026-W05, got {text!r}")
    return IsoWeek(int(match.group(1)), int(match.group(2)))


def format_week(week: IsoWeek) -> str:
    """The ``YYYY-Www`` label of a week."""
    return str(week)


def week_range(first: IsoWeek, last: IsoWeek) -> list[IsoWeek]:
    """Every week from ``first`` to ``last`` inclusive; empty when ``last`` is before ``first``."""
    count = weeks_between(first, last) + 1
    return [first.shift(i) for i in range(max(count, 0))]


def weeks_between(first: IsoWeek, last: IsoWeek) -> int:
    """How many weeks ``last`` is after ``first`` (negative if before)."""
    return (last.monday - first.monday).days // 7


def week_index(day: date, first: IsoWeek) -> int:
    """The 0-based index of the week holding ``day``, counted from ``first``.

    This is the same arithmetic the SQL tallies use (days since the first Monday, divided by
    7, floored), so the two cannot disagree at a year boundary.
    """
    return (day - first.monday).days // 7
