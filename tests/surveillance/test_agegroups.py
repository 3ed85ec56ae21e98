"""Reporting age groups from issue 7: <2 m, 2-11 m, 12-59 m, 5-14 y, 15 y and over."""

import pytest
from hypothesis import given
from hypothesis import strategies as st

from clinic_app.surveillance.agegroups import AGE_GROUP_KEYS, age_bounds, age_group


@pytest.mark.parametrize(
    "months, key",
    [
        (0, "lt2m"),
        (1.9, "lt2m"),
        (2, "m2_11"),
        (11.99, "m2_11"),
        (12, "m12_59"),
        (59.9, "m12_59"),
        (60, "y5_14"),
        (179, "y5_14"),
        (180, "y15plus"),
        (900, "y15plus"),
    ],
)
def test_it_puts_each_age_in_its_issue_7_band(months, key):  # ISSUE-7 bands
    assert age_group(months) == key


def test_it_rejects_a_negative_age():
    with pytest.raises(ValueError):
        age_group(-1)


@given(st.floats(min_value=0, max_value=1500, allow_nan=False))
def test_every_age_falls_in_exactly_one_band_whose_bounds_hold_it(months):
    key = age_group(months)
    low, high = age_bounds(key)
    assert low <= months and (high is None or months < high)
    assert key in AGE_GROUP_KEYS
