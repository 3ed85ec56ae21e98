"""After the first assessment: when checks and reassessments are due, which plan comes next,
and when the follow-up visit falls.

Pure: the time is always a parameter (``started_at``, ``now``); every number comes from RULES.
A case is described by its stored assessment result (the body returned by ``assess``).
"""

from __future__ import annotations

from datetime import date, datetime, timedelta

from .rulebook import RULES

SCHEDULE_KINDS = ("plan_b", "plan_c_iv", "plan_c_ng", "sam", "none")


def route_of(result: dict) -> str | None:
    """The Plan C route taken by a result: "iv", "ng", or None (referred, or not Plan C)."""
    if result.get("plan") != "C":
        return None
    if result.get("iv"):
        return "iv"
    if result.get("ng"):
        return "ng"
    return None


def _schedule_kind(result: dict) -> str:
    plan, route = result.get("plan"), route_of(result)
    if plan == "B":
        return "plan_b"
    if plan == "C" and route:
        return "plan_c_" + route
    if plan == "SAM":
        return "sam"
    return "none"


def _iv_reassess_hours(age_months: float) -> int:
    for row in RULES["plan_c_iv"]["schedules"]:
        if row["max_age_months"] is None or age_months < row["max_age_months"]:
            return row["reassess_after_hours"]
    raise AssertionError("plan_c_iv schedules end with an open row")


def schedule(result: dict, age_months: float, started_at: datetime) -> dict:
    """The monitoring schedule of a treatment started at ``started_at``.

    Returns ``{"kind", "reassess_at", "check_minutes": [low, high] | None, "escalate_at",
    "ends_at", "rules": [rule keys used]}``. ``escalate_at`` is the NG "not improving after
    3 hours: send for IV" time; ``ends_at`` is the SAM maximum duration.
    """
    kind = _schedule_kind(result)
    out = {"kind": kind, "reassess_at": None, "check_minutes": None, "escalate_at": None,
           "ends_at": None, "rules": []}
    hours = timedelta(hours=1)
    if kind == "plan_b":
        out["reassess_at"] = started_at + RULES["plan_b_hours"]["value"] * hours
        out["rules"] = ["plan_b_hours"]
    elif kind == "plan_c_iv":
        minutes = RULES["plan_c_reassess_minutes"]
        out["check_minutes"] = [minutes["low"], minutes["high"]]
        out["reassess_at"] = started_at + _iv_reassess_hours(age_months) * hours
        out["rules"] = ["plan_c_reassess_minutes", "plan_c_iv"]
    elif kind == "plan_c_ng":
        minutes = RULES["followup_ng_check_minutes"]
        out["check_minutes"] = [minutes["low"], minutes["high"]]
        out["escalate_at"] = started_at + RULES["followup_ng_not_improving_hours"]["value"] * hours
        out["reassess_at"] = started_at + RULES["plan_c_ng"]["hours"] * hours
        out["rules"] = ["followup_ng_check_minutes", "followup_ng_not_improving_hours",
                        "plan_c_ng"]
    elif kind == "sam":
        sam = RULES["followup_sam_check_minutes"]
        out["check_minutes"] = [sam["first"], sam["first"]]
        # The full reassessment falls at the schedule's maximum at the latest; the hourly
        # checks decide earlier whether rehydration is complete.
        out["ends_at"] = started_at + RULES["followup_sam_max_hours"]["value"] * hours
        out["reassess_at"] = out["ends_at"]
        out["rules"] = ["followup_sam_check_minutes", "followup_sam_max_hours"]
    return out


def _check_interval(plan: dict, started_at: datetime, last: datetime) -> tuple[int, int] | None:
    if plan["check_minutes"] is None:
        return None
    if plan["kind"] == "sam":
        sam = RULES["followup_sam_check_minutes"]
        if last >= started_at + timedelta(hours=sam["first_hours"]):
            return sam["then"], sam["then"]
    low, high = plan["check_minutes"]
    return low, high


def due_items(result: dict, age_months: float, started_at: datetime,
              last_check_at: datetime | None, reassessed: bool, now: datetime) -> list[dict]:
    """What is due for one case: ``[{"kind", "due_at", "late_at", "due": bool, "late": bool}]``.

    Kinds: "check" (the next bedside check), "reassess" (the full reassessment),
    "escalate" (NG not improving: send for IV). ``reassessed`` means the full reassessment of
    this treatment is done, so only its follow-ups remain.
    """
    plan = schedule(result, age_months, started_at)
    items = []
    last = last_check_at or started_at
    interval = _check_interval(plan, started_at, last)
    if interval is not None and not reassessed:
        if plan["ends_at"] is None or last < plan["ends_at"]:
            items.append(_item("check", last + timedelta(minutes=interval[0]),
                               last + timedelta(minutes=interval[1]), now))
    if plan["escalate_at"] is not None and not reassessed:
        items.append(_item("escalate", plan["escalate_at"], plan["escalate_at"], now))
    if plan["reassess_at"] is not None and not reassessed:
        items.append(_item("reassess", plan["reassess_at"], plan["reassess_at"], now))
    return sorted(items, key=lambda item: item["due_at"])


def _item(kind: str, due_at: datetime, late_at: datetime, now: datetime) -> dict:
    return {"kind": kind, "due_at": due_at, "late_at": late_at, "due": now >= due_at,
            "late": now > late_at}


def severity_rank(severity: str) -> int:
    return RULES["followup_severity_rank"]["order"].index(severity)


def reassessment(previous: dict, new_result: dict, started_at: datetime,
                 now: datetime) -> dict:
    """Compare a reassessment with the assessment before it and name the next step.

    ``previous`` and ``new_result`` are assess() results. Returns ``{"from_plan", "to_plan",
    "transition" (e.g. "B_to_A", "B_repeat"), "improved", "worse", "send_for_iv",
    "not_improving", "hours"}``. Hours are counted from ``started_at`` of the previous plan.
    """
    before, after = previous["plan"], new_result["plan"]
    rank_before, rank_after = severity_rank(previous["severity"]), severity_rank(
        new_result["severity"])
    improved, worse = rank_after < rank_before, rank_after > rank_before
    hours = (now - started_at).total_seconds() / 3600
    escalate = RULES["followup_ng_not_improving_hours"]["value"]
    send_for_iv = (route_of(previous) == "ng" and not improved and hours >= escalate)
    return {
        "from_plan": before, "to_plan": after,
        "transition": f"{before}_repeat" if before == after else f"{before}_to_{after}",
        "improved": improved, "worse": worse, "not_improving": not improved,
        "send_for_iv": send_for_iv, "hours": hours,
    }


def followup_visit(classifications: list[str], visit: date, *,
                   improving: bool | None = None) -> dict | None:
    """The follow-up visit for a case's classifications: ``{"date", "days", "reason"}``.

    The earliest applicable row wins (dysentery 2 days before persistent diarrhoea 5 days).
    Plan A's "5 days if not improving" row applies only when ``improving`` is False.
    Returns None when no row applies.
    """
    best = None
    for row in RULES["followup_visit_days"]["rows"]:
        if row["classification"] not in classifications:
            continue
        if row.get("only_if_not_improving") and improving is not False:
            continue
        if best is None or row["days"] < best["days"]:
            best = row
    if best is None:
        return None
    return {"date": visit + timedelta(days=best["days"]), "days": best["days"],
            "reason": best["classification"], "source": best["source"],
            "unconfirmed": best.get("status") == "unconfirmed"}


def next_step_texts(step: dict, *, far_beyond: dict | None = None, facility: str = "") -> list[str]:
    """The plain-language next steps of a reassessment, from RULES["followup_texts"]."""
    from .messages import render

    texts = RULES["followup_texts"]["texts"]
    out = []
    if step["send_for_iv"]:
        out.append(render(texts["send_for_iv"]["text"],
                          {"hours": RULES["followup_ng_not_improving_hours"]["value"],
                           "facility": facility}))
    if step["transition"] in texts:
        out.append(texts[step["transition"]]["text"])
    if far_beyond:
        out.append(render(texts["far_beyond_plan"]["text"], far_beyond))
    return out
