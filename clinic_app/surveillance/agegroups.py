"""Reporting age groups for the weekly tallies (bands from rules.AGE_GROUPS)."""

from __future__ import annotations

from .rules import AGE_GROUPS

AGE_GROUP_KEYS: tuple[str, ...] = tuple(key for key, _low, _high in AGE_GROUPS)


def age_group(age_months: float) -> str:
    """The key of the band holding ``age_months`` (lower bound inclusive, upper exclusive)."""
    if age_months < 0:
        raise ValueError("age cannot be negative")
    for key, low, high in AGE_GROUPS:
        if age_months >= low and (high is None or age_months < high):
            return key
    raise AssertionError("AGE_GROUPS must cover every age from 0 upwards")


def age_bounds(key: str) -> tuple[int, int | None]:
    """(lower inclusive, upper exclusive or None) in months for a band key."""
    for band, low, high in AGE_GROUPS:
        if band == key:
            return low, high
    raise KeyError(f"unknown age group {key!r}")
