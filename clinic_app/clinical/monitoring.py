"""The fluid balance of a child under treatment: target, given so far, remaining, warnings.

Target = the plan volume + the per-stool replacement (Plan A amounts by age) for each stool
recorded so far. Intake counted in cups is converted with the clinic's cup size. Pure: the
entries carry their own times; nothing reads the clock.
"""

from __future__ import annotations

from datetime import datetime

from .messages import round_volume
from .plans import per_stool
from .rulebook import RULES

INTAKE_FLUIDS = ("ors", "other")
OUTPUTS = ("stool", "vomit", "urine")


def plan_volume(result: dict) -> int | None:
    """The volume the plan prescribes, in ml (Plan A: 0; None when it cannot be worked out).

    Plan B: the 75 ml/kg total, or the table's lower figure without a weight (the same basis
    as the hourly schedule). Plan C: the IV steps or the NG total. SAM: None (the schedule
    runs by the hour, up to its maximum, not to a fixed volume).
    """
    plan = result.get("plan")
    if plan == "A":
        return 0
    if plan == "B" and result.get("ors"):
        ors = result["ors"]
        if ors["total_ml"] is not None:
            return ors["total_ml"]
        return ors[RULES["plan_b_schedule_without_weight"]["value"]]
    if plan == "C" and result.get("iv"):
        steps = [step["ml"] for step in result["iv"]["steps"]]
        return None if None in steps else sum(steps)
    if plan == "C" and result.get("ng"):
        return result["ng"]["total_ml"]
    return None


def intake_ml(entry: dict, cup_ml: int) -> int:
    """Millilitres of one intake entry: its ml, else its cups times the clinic's cup size."""
    if entry.get("ml") is not None:
        return int(entry["ml"])
    return round_volume(float(entry.get("cups") or 0) * cup_ml)


def fluid_balance(result: dict, age_months: float, entries: list[dict], cup_ml: int, *,
                  puffy_eyelids: bool = False, not_improving: bool = False) -> dict:
    """Totals, warnings and a time series for one case.

    ``entries``: ``{"at": datetime, "kind": "intake"|"output", "what": "ors"|"other" (intake)
    or "stool"|"vomit"|"urine" (output), "ml": int|None, "cups": float|None}``.
    Returns target_low/target_high (range from the per-stool range), given_ml, remaining_low/
    remaining_high (never below 0), losses_ml (measured outputs), counts, warnings, series.
    """
    base = plan_volume(result)
    stool = per_stool(age_months)
    low, high = stool.get("low_ml"), stool.get("high_ml")
    ordered = sorted(entries, key=lambda e: e["at"])
    given = losses = stools = 0
    counts = {name: 0 for name in OUTPUTS}
    series: list[dict] = []
    for entry in ordered:
        if entry["kind"] == "intake":
            given += intake_ml(entry, cup_ml)
        else:
            counts[entry["what"]] += 1
            losses += int(entry.get("ml") or 0)
            stools += entry["what"] == "stool"
        series.append({"at": entry["at"], "given_ml": given, "losses_ml": losses,
                       "target_low": _target(base, stools, low),
                       "target_high": _target(base, stools, high)})
    target_low, target_high = _target(base, stools, low), _target(base, stools, high)
    out = {
        "plan_volume_ml": base, "per_stool_low_ml": low, "per_stool_high_ml": high,
        "per_stool_as_much_as_wanted": bool(stool.get("as_much_as_wanted")),
        "stools": stools, "counts": counts, "given_ml": given, "losses_ml": losses,
        "target_low": target_low, "target_high": target_high,
        "remaining_low": None if target_low is None else max(0, target_low - given),
        "remaining_high": None if target_high is None else max(0, target_high - given),
        "series": series,
    }
    out["warnings"] = warnings(out, puffy_eyelids=puffy_eyelids, not_improving=not_improving)
    return out


def _target(base: int | None, stools: int, per: int | None) -> int | None:
    if base is None:
        return None
    return base + stools * (per or 0)


def warnings(balance: dict, *, puffy_eyelids: bool, not_improving: bool) -> list[str]:
    """Warning codes, most urgent first: "puffy_eyelids" (stop ORS), "not_improving" (reassess
    or refer), "far_beyond_plan" (more than the PRACTICE factor times the upper target)."""
    found = []
    if puffy_eyelids:
        found.append("puffy_eyelids")
    if not_improving:
        found.append("not_improving")
    factor = RULES["followup_overhydration_factor"]["value"]
    top = balance["target_high"]
    if top and balance["given_ml"] > factor * top:
        found.append("far_beyond_plan")
    return found


def last_time(entries: list[dict]) -> datetime | None:
    """The time of the latest entry (None when there is none)."""
    return max((entry["at"] for entry in entries), default=None)
