"""CDC EARS C1, C2 and C3 on weekly counts (definitions: rules.py source R-EARSC).

With Y(t) the count of week t, b = 7 and a *sample* SD (divisor b - 1):

- C1(t) = (Y(t) - mean(Y[t-7..t-1])) / S, upper bound U1 = mean + z*S.
- C2(t) is the same with the baseline Y[t-9..t-3] (a 2-week guard band).
- C3(t) = sum over i = t-2..t of max(0, C2(i) - 1): the classic definition. R's ``earsC``
  C3 departs from it (reference note §B1.4), so C3 is checked against hand-worked values only.

Minimum history: C1 needs 7 earlier weeks, C2 9, C3 11; before that the result has status
``"insufficient_history"`` and never alarms.

Sparse data rule (explicit): the SD used is ``sigma = max(S, min_sigma)`` exactly as R's
``pmax(sd, minSigma)``. With the default min_sigma = 0.5 a constant baseline gives
U = mean + z*0.5. Only when min_sigma = 0 and the baseline is constant is sigma 0: then the
statistic is undefined (value None, status ``"undefined"``), the upper bound is the baseline
mean and any count above it alarms, which is what R does in that case.

Alarm: C1/C2 alarm when the observed count exceeds the upper bound (R's ``observed >
upperbound``); C3 alarms when C3 > z. The default z values come from R's alpha levels.
"""

from __future__ import annotations

import math
import statistics
from collections.abc import Sequence
from dataclasses import dataclass
from statistics import NormalDist

from .rules import (
    EARS_ALPHA_C1,
    EARS_ALPHA_C2,
    EARS_ALPHA_C3,
    EARS_BASELINE,
    EARS_GUARD_BAND,
    EARS_MIN_SIGMA,
)

METHODS = ("C1", "C2", "C3")
_ALPHA = {"C1": EARS_ALPHA_C1, "C2": EARS_ALPHA_C2, "C3": EARS_ALPHA_C3}


@dataclass(frozen=True)
class EarsResult:
    """The outcome of one method at one week.

    ``baseline_mean``/``baseline_sd`` describe the baseline of week t itself (for C3: the C2
    baseline of week t). ``sigma`` is the SD actually divided by, after the sparse-data rule.
    ``upper_bound`` is the count at week t above which the method alarms; for C3 it is None
    when the excess of the two previous weeks alone already exceeds z.
    """

    method: str
    index: int
    observed: float
    value: float | None
    baseline_mean: float | None
    baseline_sd: float | None
    sigma: float | None
    upper_bound: float | None
    threshold: float
    alarm: bool
    status: str  # "ok" | "insufficient_history" | "undefined"


def default_threshold(method: str) -> float:
    """z = qnorm(1 - alpha) for the method's R default alpha (3.0902 for C1/C2, 1.9600 for C3)."""
    return NormalDist().inv_cdf(1 - _ALPHA[_check_method(method)])


def min_history(method: str, baseline: int = EARS_BASELINE) -> int:
    """How many earlier weeks a method needs: b, b + 2 or b + 4 (7, 9, 11 by default)."""
    extra = {"C1": 0, "C2": EARS_GUARD_BAND, "C3": EARS_GUARD_BAND + 2}
    return baseline + extra[_check_method(method)]


def ears(
    counts: Sequence[float],
    method: str,
    t: int | None = None,
    *,
    z: float | None = None,
    min_sigma: float = EARS_MIN_SIGMA,
    baseline: int = EARS_BASELINE,
) -> EarsResult:
    """Run C1, C2 or C3 at week index ``t`` (default: the last) of a series of weekly counts."""
    method = _check_method(method)
    if baseline < 3:
        raise ValueError("the baseline needs at least 3 weeks")
    if min_sigma < 0:
        raise ValueError("min_sigma cannot be negative")
    t = len(counts) - 1 if t is None else t
    if not 0 <= t < len(counts):
        raise IndexError(f"week index {t} is outside the series")
    threshold = default_threshold(method) if z is None else z
    observed = float(counts[t])
    if t < min_history(method, baseline):
        return EarsResult(
            method,
            t,
            observed,
            None,
            None,
            None,
            None,
            None,
            threshold,
            False,
            "insufficient_history",
        )
    if method == "C3":
        return _c3(counts, t, threshold, min_sigma, baseline)
    lag = 1 if method == "C1" else 1 + EARS_GUARD_BAND
    mean, sd, sigma = _baseline(counts, t, lag, baseline, min_sigma)
    upper = mean + threshold * sigma
    value = _statistic(observed, mean, sigma)
    return EarsResult(
        method,
        t,
        observed,
        None if sigma == 0 else value,
        mean,
        sd,
        sigma,
        upper,
        threshold,
        observed > upper,
        "undefined" if sigma == 0 else "ok",
    )


def ears_series(counts: Sequence[float], method: str, **options: float) -> list[EarsResult]:
    """The method at every week of the series (early weeks: insufficient history)."""
    return [ears(counts, method, t, **options) for t in range(len(counts))]


def _c3(counts: Sequence[float], t: int, z: float, min_sigma: float, baseline: int) -> EarsResult:
    lag = 1 + EARS_GUARD_BAND
    parts = []
    for i in (t - 2, t - 1, t):
        mean, sd, sigma = _baseline(counts, i, lag, baseline, min_sigma)
        parts.append(max(0.0, _statistic(float(counts[i]), mean, sigma) - 1))
    carried = parts[0] + parts[1]
    value = carried + parts[2]
    # Solve max(0, (Y - mean)/sigma - 1) + carried > z for Y; below zero any Y alarms.
    upper = mean + sigma * (1 + z - carried) if carried <= z else None
    undefined = sigma == 0 or math.isinf(value)
    return EarsResult(
        "C3",
        t,
        float(counts[t]),
        None if undefined else value,
        mean,
        sd,
        sigma,
        upper,
        z,
        value > z,
        "undefined" if undefined else "ok",
    )


def _baseline(
    counts: Sequence[float], t: int, lag: int, baseline: int, min_sigma: float
) -> tuple[float, float, float]:
    """Mean, sample SD and sparse-rule SD of the ``baseline`` weeks ending ``lag`` before t."""
    window = [float(c) for c in counts[t - lag - baseline + 1 : t - lag + 1]]
    mean = statistics.fmean(window)
    sd = statistics.stdev(window)
    return mean, sd, max(sd, min_sigma)


def _statistic(observed: float, mean: float, sigma: float) -> float:
    """(Y - mean) / sigma, taking the limit when sigma is 0 (R would give Inf or NaN)."""
    if sigma > 0:
        return (observed - mean) / sigma
    if observed == mean:
        return 0.0
    return math.inf if observed > mean else -math.inf


def _check_method(method: str) -> str:
    if method not in METHODS:
        raise ValueError(f"unknown EARS method {method!r}; expected one of {METHODS}")
    return method
