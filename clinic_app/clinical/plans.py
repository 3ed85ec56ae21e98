"""Treatment plans: Plan A amounts, Plan B table and volume, Plan C chain, SAM schedule, zinc.

Every volume is computed from the exact product and rounded once with ``round_volume``.
"""

from __future__ import annotations

from .messages import round_volume
from .rulebook import RULES
from .types import ClinicSettings


def row_below(rows: list, key: str, value: float) -> dict | None:
    """The first row whose ``key`` bound is above ``value`` (None bound = open-ended)."""
    for row in rows:
        if row[key] is None or value < row[key]:
            return row
    return None


def _ml(weight_kg: float | None, ml_per_kg: float) -> int | None:
    return None if weight_kg is None else round_volume(ml_per_kg * weight_kg)


def plan_a(age_months: float) -> dict:
    """The WHO 2005 Plan A row for the age (per-stool amount and home ORS per day)."""
    return row_below(RULES["plan_a"]["rows"], "max_age_months", age_months)


def per_stool(age_months: float) -> dict:
    """``{"low_ml", "high_ml"}`` or ``{"as_much_as_wanted": True}``."""
    row = plan_a(age_months)
    if row.get("as_much_as_wanted"):
        return {"as_much_as_wanted": True}
    return {"low_ml": row["per_stool_low_ml"], "high_ml": row["per_stool_high_ml"]}


def plan_b(age_months: float, weight_kg: float | None, table_name: str) -> dict:
    """Plan B: 75 ml/kg when the weight is known, and the table row by weight (else by age)."""
    table = RULES["plan_b_tables"][table_name]
    hours = RULES["plan_b_hours"]["value"]
    per_kg = RULES["plan_b_ml_per_kg"]["value"]
    if weight_kg is not None:
        row = row_below(table["rows"], "max_weight_kg", weight_kg)
        total = round_volume(per_kg * weight_kg)
        hourly = [round_volume(per_kg * weight_kg / hours)] * hours
    else:
        row = row_below(table["rows"], "max_age_months", age_months)
        total = None
        basis = RULES["plan_b_schedule_without_weight"]["value"]
        hourly = [] if row is None else [round_volume(row[basis] / hours)] * hours
    return {
        "total_ml": total,
        "low_ml": None if row is None else row["low_ml"],
        "high_ml": None if row is None else row["high_ml"],
        "hours": hours,
        "basis": "age" if weight_kg is None else "weight",
        "hourly_ml": hourly,
        "ml_per_kg": per_kg,
        "table": table_name,
        "table_label": table["label"],
    }


def plan_c_route(settings: ClinicSettings) -> str:
    """The Plan C decision chain: "iv", "refer_iv_facility", "ng" or "refer"."""
    if settings.iv_available:
        return "iv"
    minutes = settings.minutes_to_iv_facility
    if minutes is not None and minutes < RULES["plan_c_iv_facility_max_minutes"]["value"]:
        return "refer_iv_facility"
    if settings.ng_trained:
        return "ng"
    return "refer"


def plan_c_iv(age_months: float, weight_kg: float | None) -> dict:
    """IV schedule by age (< 12 months: 1 h + 5 h; otherwise 30 min + 2.5 h)."""
    rule = RULES["plan_c_iv"]
    schedule = row_below(rule["schedules"], "max_age_months", age_months)
    steps = [{"ml": _ml(weight_kg, s["ml_per_kg"]), "ml_per_kg": s["ml_per_kg"],
              "minutes": s["minutes"]} for s in schedule["steps"]]
    return {"fluid": rule["fluid"], "steps": steps,
            "reassess_after_hours": schedule["reassess_after_hours"]}


def plan_c_ng(weight_kg: float | None) -> dict:
    """Nasogastric ORS 20 ml/kg/h for 6 h (total from the exact product, not the hourly)."""
    rule = RULES["plan_c_ng"]
    per_hour, hours = rule["ml_per_kg_per_hour"], rule["hours"]
    return {"ml_per_hour": _ml(weight_kg, per_hour), "hours": hours,
            "total_ml": _ml(weight_kg, per_hour * hours), "ml_per_kg_per_hour": per_hour}


def sam_rehydration(weight_kg: float | None) -> dict:
    """WHO ReSoMal schedule: 5 ml/kg every 30 min for 2 h, then 5-10 ml/kg/h, max 12 h."""
    rule = RULES["sam_rehydration"]
    return {
        "first_2h_ml_every_30_min": _ml(weight_kg, rule["first_ml_per_kg"]),
        "then_ml_per_hour_low": _ml(weight_kg, rule["then_ml_per_kg_per_hour_low"]),
        "then_ml_per_hour_high": _ml(weight_kg, rule["then_ml_per_kg_per_hour_high"]),
        "max_hours": rule["max_hours"],
        "first_ml_per_kg": rule["first_ml_per_kg"],
        "interval_minutes": rule["first_interval_minutes"],
        "first_hours": rule["first_hours"],
        "then_ml_per_kg_per_hour_low": rule["then_ml_per_kg_per_hour_low"],
        "then_ml_per_kg_per_hour_high": rule["then_ml_per_kg_per_hour_high"],
    }


def sam_shock_iv(weight_kg: float | None) -> dict:
    """SAM with shock: IV 15 ml/kg over 1 hour (the only IV in SAM)."""
    rule = RULES["sam_shock_iv"]
    return {"fluid": rule["fluid"], "steps": [
        {"ml": _ml(weight_kg, rule["ml_per_kg"]), "ml_per_kg": rule["ml_per_kg"],
         "minutes": rule["minutes"]}]}


def zinc(age_months: float, settings: ClinicSettings) -> dict | None:
    """10 mg under 6.0 months, 20 mg from 6.0 months; none under 2 months, nor from the
    clinic's upper age (``zinc_max_age_months``, 5 years by default, None for no limit)."""
    if age_months < RULES["zinc_min_age_months"]["value"]:
        return None
    upper = settings.zinc_max_age_months
    if upper is not None and age_months >= upper:
        return None
    row = row_below(RULES["zinc"]["rows"], "max_age_months", age_months)
    if row is None:
        return None
    return {"mg_per_day": row["mg_per_day"], "days_min": settings.zinc_days_min,
            "days_max": settings.zinc_days_max}
