"""Stock arithmetic: on hand, recent average use, weeks of stock left, low-stock flag.

Thresholds here are our own test inputs (common practice, no source); the default average
window of 4 weeks is rules.STOCK_AVERAGE_WEEKS (PRACTICE).
"""

import pytest
from hypothesis import given
from hypothesis import strategies as st

from clinic_app.surveillance.stock import average_weekly_use, on_hand, stock_status, weeks_of_stock


def test_on_hand_is_receipts_plus_adjustments_minus_consumption():
    assert on_hand(received=500, adjusted=-20, consumed=130) == 350


def test_the_average_uses_only_the_last_four_weeks():
    # (40 + 60 + 20 + 40) / 4 = 40; the first week (1000) is too old to count.
    assert average_weekly_use([1000, 40, 60, 20, 40]) == 40


def test_weeks_left_divides_stock_by_average_use():
    assert weeks_of_stock(100, 40) == 2.5
    assert weeks_of_stock(-5, 40) == 0


def test_no_recent_use_means_no_estimate_rather_than_infinity():
    assert weeks_of_stock(100, 0) is None
    assert weeks_of_stock(100, average_weekly_use([])) is None


def test_it_flags_stock_below_the_threshold_as_low():
    status = stock_status("ors_sachets", 100, [40, 40, 40, 40], low_weeks=3)
    assert (status.weeks_left, status.low) == (2.5, True)
    assert not stock_status("ors_sachets", 200, [40] * 4, low_weeks=3).low


def test_an_empty_shelf_is_low_even_when_nothing_was_used():
    assert stock_status("zinc_tablets", 0, [0, 0]).low
    assert not stock_status("zinc_tablets", 10, [0, 0]).low


@given(
    st.integers(min_value=0, max_value=10_000),
    st.lists(st.integers(min_value=0, max_value=500), min_size=1, max_size=12),
)
def test_the_stock_lasts_weeks_left_times_the_average_use(stock, weekly):
    status = stock_status("ors_sachets", stock, weekly)
    if status.weeks_left is not None:
        assert status.weeks_left * status.average_weekly_use == pytest.approx(stock)
