"""ISO 8601 weeks (Monday start), including 2026's week 53 that runs into January 2027.

Calendar facts below are ISO 8601 and checkable on any calendar: 2026 starts on a Thursday,
so it has 53 weeks; 2025 and 2027 have 52.
"""

from datetime import date, datetime, timedelta
from itertools import pairwise

import pytest
from hypothesis import given
from hypothesis import strategies as st

from clinic_app.surveillance.isoweek import (
    IsoWeek,
    WeekError,
    format_week,
    local_date,
    parse_week,
    week_index,
    week_of,
    week_range,
    weeks_between,
    weeks_in_year,
)


@pytest.mark.parametrize("year, weeks", [(2025, 52), (2026, 53), (2027, 52), (2020, 53)])
def test_it_counts_the_weeks_of_a_year(year, weeks):
    assert weeks_in_year(year) == weeks


def test_week_53_of_2026_runs_from_monday_28_december_to_sunday_3_january():
    w53 = parse_week("2026-W53")
    assert w53.monday == date(2026, 12, 28)
    assert w53.sunday == date(2027, 1, 3)
    assert w53.monday.weekday() == 0


@pytest.mark.parametrize(
    "day, label",
    [
        (date(2026, 12, 27), "2026-W52"),
        (date(2026, 12, 28), "2026-W53"),
        (date(2027, 1, 1), "2026-W53"),
        (date(2027, 1, 3), "2026-W53"),
        (date(2027, 1, 4), "2027-W01"),
        (date(2026, 1, 1), "2026-W01"),
        (date(2025, 12, 29), "2026-W01"),
    ],
)
def test_it_places_days_around_the_year_boundary_in_the_right_week(day, label):
    assert format_week(week_of(day)) == label


def test_the_week_of_a_timestamp_is_that_of_the_local_date_as_written():
    # 00:30 on Monday in UTC+3 is still Sunday in UTC; the worker's calendar says Monday.
    assert str(week_of("2026-12-28T00:30:00+03:00")) == "2026-W53"
    assert str(week_of("2027-01-03T23:59:59-05:00")) == "2026-W53"
    assert str(week_of(datetime(2027, 1, 4, 0, 0))) == "2027-W01"


@pytest.mark.parametrize(
    "text", ["2025-W53", "2026-W54", "2026-W00", "2026-53", "2026W05", "26-W05", "", "2026-w05"]
)
def test_it_rejects_weeks_that_do_not_exist_or_are_badly_written(text):
    with pytest.raises(WeekError):
        parse_week(text)


def test_it_rejects_a_timestamp_without_a_date():
    with pytest.raises(WeekError):
        local_date("yesterday")


def test_a_range_across_the_year_boundary_includes_week_53():
    weeks = week_range(parse_week("2026-W51"), parse_week("2027-W02"))
    assert [str(w) for w in weeks] == [
        "2026-W51",
        "2026-W52",
        "2026-W53",
        "2027-W01",
        "2027-W02",
    ]


def test_an_inverted_range_is_empty():
    assert week_range(parse_week("2027-W02"), parse_week("2026-W51")) == []


def test_week_index_counts_whole_weeks_from_the_first_monday():
    first = parse_week("2026-W52")
    assert week_index(date(2026, 12, 21), first) == 0
    assert week_index(date(2027, 1, 3), first) == 1
    assert week_index(date(2027, 1, 4), first) == 2
    assert week_index(date(2026, 12, 20), first) == -1


days = st.dates(min_value=date(2000, 1, 1), max_value=date(2100, 12, 31))


@given(days)
def test_formatting_then_parsing_gives_back_the_same_week(day):
    week = week_of(day)
    assert parse_week(format_week(week)) == week


@given(days)
def test_every_day_lies_between_its_weeks_monday_and_sunday(day):
    week = week_of(day)
    assert week.monday <= day <= week.sunday
    assert (week.sunday - week.monday).days == 6


@given(days, st.integers(min_value=-300, max_value=300))
def test_shifting_by_n_weeks_moves_the_monday_by_7n_days(day, n):
    week = week_of(day)
    assert week.shift(n).monday == week.monday + timedelta(weeks=n)
    assert weeks_between(week, week.shift(n)) == n


@given(days, days)
def test_week_index_agrees_with_the_week_of_the_day(day, start):
    first = week_of(start)
    assert first.shift(week_index(day, first)) == week_of(day)


@given(days, st.integers(min_value=0, max_value=120))
def test_a_range_has_consecutive_distinct_weeks(day, n):
    first = week_of(day)
    weeks = week_range(first, first.shift(n))
    assert len(weeks) == n + 1 == len(set(weeks))
    assert weeks == sorted(weeks)
    assert all(b.monday - a.monday == timedelta(weeks=1) for a, b in pairwise(weeks))


def test_weeks_order_by_time():
    assert IsoWeek(2026, 53) < IsoWeek(2027, 1) < IsoWeek(2027, 2)
