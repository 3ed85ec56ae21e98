"""Fluid helpers: Holliday-Segar maintenance, weight from age, free-water deficit.

All numbers come from RULES (keys ``maintenance_holliday_segar``,
``maintenance_above_20kg_variant_ml_per_kg``, ``weight_from_age``, ``free_water_deficit``,
``total_body_water_fraction``, ``sodium_max_fall_mmol_l_per_day``). Results are exact
(unrounded) floats; the assessment rounds volumes with its one rounding rule. The arithmetic
is written in the order the JavaScript engine repeats it.

- Holliday-Segar daily (S26): 100 ml/kg for the first 10 kg, 50 ml/kg for the next 10 kg,
  then 20 ml/kg (the original; 25 ml/kg is a clinic setting, reference C10).
- 4-2-1 hourly (S26): 4, 2, 1 ml/kg/h over the same bands. It is not the daily rule / 24.
- Weight from age (S29): updated APLS, classic APLS, Best Guess, as ``factor x age + add``
  with age in months or in years (months / 12, not completed years). None outside the
  formula's age band. Always an estimate; never for a child with SAM.
- Free-water deficit (S31): TBW fraction x weight x (Na / 140 - 1) litres; 0 when the
  sodium is 140 or less. The TBW fraction under 12 months (0.7) is a modelling choice,
  not a guideline number (reference §13); adult/elderly age edges are common practice.
"""

from __future__ import annotations

from .rulebook import RULES

WEIGHT_METHODS = ("apls_updated", "apls_classic", "best_guess")


def _banded(weight_kg: float, rates: list[float]) -> float:
    """Sum of rate x kg over the bands 0-10, 10-20 and above 20 kg."""
    if weight_kg < 0:
        raise ValueError("weight must not be negative")
    uppers = RULES["maintenance_holliday_segar"]["band_upper_kg"]
    total, lower = 0.0, 0
    for upper, rate in zip(uppers, rates, strict=False):
        if weight_kg <= upper:
            return total + rate * (weight_kg - lower)
        total = total + rate * (upper - lower)
        lower = upper
    return total + rates[-1] * (weight_kg - lower)


def maintenance_daily_ml(weight_kg: float, above_20_ml_per_kg: float = 20) -> float:
    """Holliday-Segar maintenance water in ml/day (S26); ``above_20_ml_per_kg`` 20 or 25."""
    first, second, _original = RULES["maintenance_holliday_segar"]["ml_per_kg_per_day"]
    return _banded(weight_kg, [first, second, above_20_ml_per_kg])


def maintenance_hourly_421_ml(weight_kg: float) -> float:
    """Maintenance water in ml/hour by the 4-2-1 rule (S26)."""
    return _banded(weight_kg, RULES["maintenance_holliday_segar"]["ml_per_kg_per_hour"])


def weight_from_age_row(age_months: float, method: str) -> dict | None:
    """The rulebook row of ``method`` that covers this age, or None."""
    if method not in WEIGHT_METHODS:
        raise ValueError(f"unknown weight-from-age method {method!r}")
    for row in RULES["weight_from_age"]["methods"][method]["rows"]:
        if row["min_months"] <= age_months < row["below_months"]:
            return row
    return None


def weight_from_age(age_months: float, method: str) -> float | None:
    """Estimated weight in kg by "apls_updated", "apls_classic" or "best_guess" (S29).

    None when the age is outside the formula's bands.
    """
    row = weight_from_age_row(age_months, method)
    if row is None:
        return None
    age = age_months if row["per"] == "month" else age_months / 12
    return row["factor"] * age + row["add"]


def total_body_water_row(age_months: float) -> dict:
    """The TBW-fraction row for the age (carries ``status`` when a modelling choice)."""
    for row in RULES["total_body_water_fraction"]["rows"]:
        if row["min_months"] <= age_months and (row["below_months"] is None
                                                or age_months < row["below_months"]):
            return row
    raise ValueError("age must not be negative")


def total_body_water_fraction(age_months: float, sex: str | None) -> float | None:
    """Fraction of body weight that is water; None for an adult of unknown sex."""
    row = total_body_water_row(age_months)
    if "fraction" in row:
        return row["fraction"]
    return row.get(sex) if sex in ("female", "male") else None


def free_water_deficit_l(weight_kg: float, sodium_mmol_l: float, sex: str | None,
                         age_months: float) -> float | None:
    """Free-water deficit in litres (S31): TBW x (Na / 140 - 1); 0 when Na <= 140.

    Information only. None when the TBW fraction cannot be chosen (adult without sex).
    """
    fraction = total_body_water_fraction(age_months, sex)
    if fraction is None:
        return None
    normal = RULES["free_water_deficit"]["normal_sodium_mmol_l"]
    if sodium_mmol_l <= normal:
        return 0.0
    return fraction * weight_kg * (sodium_mmol_l / normal - 1)


def sodium_floor_after_24h(start_mmol_l: float) -> tuple[float, float]:
    """Lowest safe sodium after 24 h at the 12 and 10 mmol/L/day caps (S31, C18)."""
    cap = RULES["sodium_max_fall_mmol_l_per_day"]
    return start_mmol_l - cap["max"], start_mmol_l - cap["min"]
