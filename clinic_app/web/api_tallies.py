"""``GET /api/v1/tallies?from=YYYY-Www&to=YYYY-Www[&area=...]``: weekly tallies as JSON.

Supervisors and admins only. Besides the fields fixed by the issue, each week carries the
other counters (danger signs, routine and completed referrals, dysentery, persistent
diarrhoea, SAM, outcomes). Optional filters beyond ``area``: ``worker`` (user id),
``age_group`` and ``sex``.
"""

from __future__ import annotations

from flask import jsonify, request

from clinic_app.i18n import _
from clinic_app.storage import tallies
from clinic_app.storage.db import get_db
from clinic_app.surveillance.agegroups import AGE_GROUP_KEYS
from clinic_app.surveillance.isoweek import IsoWeek, WeekError, parse_week, weeks_between
from clinic_app.web.api import ApiError, api_roles_required, bp

OVERSIGHT = ("supervisor", "admin")
# Five years of weeks: enough for any chart, small enough to answer quickly.
MAX_WEEKS = 261


def week_json(w: dict) -> dict:
    """One week of tallies in the API's shape."""
    return {
        "week": w["week"],
        "cases": w["cases"],
        "by_severity": {"none": w["sev_none"], "some": w["sev_some"], "severe": w["sev_severe"]},
        "by_plan": {"A": w["plan_a"], "B": w["plan_b"], "C": w["plan_c"], "SAM": w["plan_sam"]},
        "referrals_urgent": w["referrals_urgent"],
        "suspected_cholera": w["suspected_cholera"],
        "deaths": w["outcome_died"],
        "ors_sachets": w["ors_sachets"],
        "zinc_tablets": w["zinc_tablets"],
        "danger_signs": w["danger_signs"],
        "referrals_routine": w["referrals_routine"],
        "referrals_completed": w["referrals_completed"],
        "dysentery": w["dysentery"],
        "persistent_diarrhoea": w["persistent_diarrhoea"],
        "severe_acute_malnutrition": w["severe_acute_malnutrition"],
        "outcomes": {
            "recovered": w["outcome_recovered"],
            "referred": w["outcome_referred"],
            "admitted": w["outcome_admitted"],
            "died": w["outcome_died"],
            "lost": w["outcome_lost"],
        },
    }


def parse_filter(args) -> tallies.TallyFilter:
    """The optional filters of a tallies request; ApiError 400 on a bad value."""
    worker = args.get("worker") or None
    # ASCII digits only, and few of them: "²" passes isdigit() but not int(), and a number
    # of dozens of digits overflows SQLite's INTEGER (both were 500s under the fuzz test).
    if worker is not None and not (worker.isascii() and worker.isdigit() and len(worker) <= 18):
        raise ApiError(400, "bad_filter", _("Some filters are not valid."),
                       {"worker": _("Use the number of a health worker.")})  # fmt: skip
    age = args.get("age_group") or None
    if age is not None and age not in AGE_GROUP_KEYS:
        raise ApiError(400, "bad_filter", _("Some filters are not valid."),
                       {"age_group": _("Use one of: %(groups)s.",
                                       groups=", ".join(AGE_GROUP_KEYS))})  # fmt: skip
    sex = args.get("sex") or None
    if sex is not None and sex not in tallies.SEXES:
        raise ApiError(400, "bad_filter", _("Some filters are not valid."),
                       {"sex": _("Use f or m.")})  # fmt: skip
    return tallies.TallyFilter(
        area=args.get("area") or None,
        user_id=int(worker) if worker else None,
        age_group=age,
        sex=sex,
    )


def parse_weeks(args) -> tuple[IsoWeek, IsoWeek]:
    """``from`` and ``to`` as weeks; ApiError 400 when missing, malformed or reversed."""
    fields, weeks = {}, {}
    for name in ("from", "to"):
        try:
            weeks[name] = parse_week(args.get(name, ""))
        except WeekError:
            fields[name] = _("Use an ISO week such as 2026-W48.")
    if fields:
        raise ApiError(400, "bad_week", _("The weeks asked for are not valid."), fields)
    span = weeks_between(weeks["from"], weeks["to"]) + 1
    if span < 1:
        raise ApiError(400, "bad_week", _("The first week must not be after the last."),
                       {"to": _("Use a week on or after the first week.")})  # fmt: skip
    if span > MAX_WEEKS:
        raise ApiError(400, "bad_week", _("Ask for at most %(n)d weeks at a time.", n=MAX_WEEKS),
                       {"to": _("Choose a shorter range.")})  # fmt: skip
    return weeks["from"], weeks["to"]


@bp.get("/tallies")
@api_roles_required(*OVERSIGHT)
def tallies_route():
    first, last = parse_weeks(request.args)
    weeks = tallies.weekly_tallies(get_db(), first, last, parse_filter(request.args))
    return jsonify({"weeks": [week_json(w) for w in weeks]})
