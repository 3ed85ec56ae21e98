"""Stock arithmetic for ORS sachets and zinc tablets: on hand, recent use, weeks left."""

from __future__ import annotations

import statistics
from collections.abc import Sequence
from dataclasses import dataclass

from .rules import STOCK_AVERAGE_WEEKS, STOCK_LOW_WEEKS_DEFAULT


@dataclass(frozen=True)
class StockStatus:
    """One item's position. ``weeks_left`` is None when nothing was used recently."""

    item: str
    on_hand: int
    average_weekly_use: float | None
    weeks_left: float | None
    low: bool


def on_hand(received: int, adjusted: int, consumed: int) -> int:
    """Receipts plus signed adjustments minus what the cases consumed."""
    return received + adjusted - consumed


def average_weekly_use(weekly_use: Sequence[int], weeks: int = STOCK_AVERAGE_WEEKS) -> float | None:
    """Mean use over the last ``weeks`` complete weeks given (oldest first); None if none."""
    if weeks < 1:
        raise ValueError("the average needs at least one week")
    recent = list(weekly_use)[-weeks:]
    return statistics.fmean(recent) if recent else None


def weeks_of_stock(stock: int, average_use: float | None) -> float | None:
    """How many weeks ``stock`` lasts at ``average_use`` a week; None when use is zero."""
    if average_use is None or average_use <= 0:
        return None
    return max(stock, 0) / average_use


def stock_status(
    item: str,
    stock: int,
    weekly_use: Sequence[int],
    *,
    low_weeks: float = STOCK_LOW_WEEKS_DEFAULT,
    weeks: int = STOCK_AVERAGE_WEEKS,
) -> StockStatus:
    """Stock position of one item; low when none is left or it lasts under ``low_weeks``."""
    average = average_weekly_use(weekly_use, weeks)
    left = weeks_of_stock(stock, average)
    low = stock <= 0 or (left is not None and left < low_weeks)
    return StockStatus(item, stock, average, left, low)
