"""Weekly tallies for the supervisor, read from the trigger-maintained ``tally_daily`` table.

The week of a case is the ISO week of the local date written in its ``created_at``
(clinic_app.surveillance.isoweek). Weeks are found with whole-day arithmetic from the first
requested Monday, so 2026-W53 (28 Dec 2026 - 3 Jan 2027) needs no special case.
Quarantined cases never count: the triggers only add rows whose status is 'active'.
"""

from __future__ import annotations

import sqlite3
from dataclasses import dataclass

from clinic_app.surveillance.agegroups import AGE_GROUP_KEYS, age_bounds
from clinic_app.surveillance.isoweek import IsoWeek, week_range

# The counters of tally_daily, in the order the pages show them.
COUNTERS = (
    "cases",
    "sev_none", "sev_some", "sev_severe",
    "plan_a", "plan_b", "plan_c", "plan_sam",
    "danger_signs",
    "referrals_urgent", "referrals_routine", "referrals_completed",
    "dysentery", "persistent_diarrhoea", "severe_acute_malnutrition", "suspected_cholera",
    "outcome_recovered", "outcome_referred", "outcome_admitted", "outcome_died", "outcome_lost",
    "ors_sachets", "zinc_tablets",
    # Quality-indicator numerators and denominators (see surveillance/quality.py).
    "dehydrated_given_ors", "zinc_advised", "zinc_advised_given", "severe_referred_or_plan_c",
)  # fmt: skip

# The sex filter's short codes, and how the clinical input spells them in stored cases
# (clinic_app.clinical.growth.SEXES): the filter must compare with the stored spelling.
SEXES = ("f", "m")
STORED_SEX = {"f": "female", "m": "male"}

_WEEK = "CAST((julianday(day) - julianday(:monday)) / 7 AS INTEGER)"
_SUMS = ", ".join(f"SUM({name}) AS {name}" for name in COUNTERS)


@dataclass(frozen=True)
class TallyFilter:
    """Optional filters; None means "all"."""

    area: str | None = None
    user_id: int | None = None
    age_group: str | None = None
    sex: str | None = None

    def where(self) -> tuple[str, dict]:
        """The extra WHERE clauses and their parameters."""
        clauses, params = [], {}
        if self.sex not in (None, "", *STORED_SEX):
            raise ValueError(f"unknown sex {self.sex!r}")
        for column in ("area", "user_id", "age_group", "sex"):
            value = getattr(self, column)
            if value is not None and value != "":
                clauses.append(f" AND {column} = :{column}")
                params[column] = STORED_SEX[value] if column == "sex" else value
        if self.age_group is not None and self.age_group not in AGE_GROUP_KEYS:
            raise ValueError(f"unknown age group {self.age_group!r}")
        return "".join(clauses), params

    def case_where(self) -> tuple[str, dict]:
        """The same filters as WHERE clauses on the cases table."""
        clauses, params = [], {}
        for column in ("area", "user_id"):
            if getattr(self, column) not in (None, ""):
                clauses.append(f" AND cases.{column} = :{column}")
                params[column] = getattr(self, column)
        if self.sex:
            clauses.append(" AND coalesce(cases.sex, '') = :sex")
            params["sex"] = STORED_SEX[self.sex]
        if self.age_group:
            low, high = age_bounds(self.age_group)
            clauses.append(" AND cases.age_months >= :age_low")
            params["age_low"] = low
            if high is not None:
                clauses.append(" AND cases.age_months < :age_high")
                params["age_high"] = high
        return "".join(clauses), params


def _bounds(first: IsoWeek, last: IsoWeek) -> dict:
    return {
        "monday": first.monday.isoformat(),
        "lo": first.monday.isoformat(),
        "hi": last.shift(1).monday.isoformat(),
    }


def weekly_tallies(
    conn: sqlite3.Connection, first: IsoWeek, last: IsoWeek, where: TallyFilter | None = None
) -> list[dict]:
    """One dict per week from ``first`` to ``last`` (zeros for empty weeks): week + COUNTERS."""
    extra, params = (where or TallyFilter()).where()
    sql = (
        f"SELECT {_WEEK} AS w, {_SUMS} FROM tally_daily"
        f" WHERE day >= :lo AND day < :hi{extra} GROUP BY w"
    )
    found = {row["w"]: row for row in conn.execute(sql, {**_bounds(first, last), **params})}
    out = []
    for index, week in enumerate(week_range(first, last)):
        row = found.get(index)
        out.append({"week": str(week), **{n: (row[n] if row else 0) for n in COUNTERS}})
    return out


def weekly_counts_by_area(
    conn: sqlite3.Connection, first: IsoWeek, last: IsoWeek
) -> dict[str, list[int]]:
    """Case counts per area per week (every week present, zeros included), for EARS."""
    sql = (
        f"SELECT area, {_WEEK} AS w, SUM(cases) AS n FROM tally_daily"
        " WHERE day >= :lo AND day < :hi GROUP BY area, w"
    )
    size = len(week_range(first, last))
    out: dict[str, list[int]] = {}
    for row in conn.execute(sql, _bounds(first, last)):
        out.setdefault(row["area"], [0] * size)[row["w"]] = row["n"]
    return out


def consumption_totals(conn: sqlite3.Connection) -> dict[str, int]:
    """ORS sachets and zinc tablets given in all active cases so far."""
    row = conn.execute(
        "SELECT coalesce(SUM(ors_sachets), 0) AS ors_sachets,"
        " coalesce(SUM(zinc_tablets), 0) AS zinc_tablets FROM tally_daily"
    ).fetchone()
    return {"ors_sachets": row["ors_sachets"], "zinc_tablets": row["zinc_tablets"]}


def areas(conn: sqlite3.Connection) -> list[str]:
    """Every area that has cases, for the filter list."""
    return [r[0] for r in conn.execute("SELECT DISTINCT area FROM tally_daily ORDER BY area")]


def workers(conn: sqlite3.Connection) -> list[sqlite3.Row]:
    """Users who recorded cases, for the health-worker filter (id, name)."""
    return conn.execute(
        "SELECT users.id, coalesce(nullif(users.display_name, ''), users.username) AS name"
        " FROM users WHERE users.id IN (SELECT DISTINCT user_id FROM tally_daily)"
        " ORDER BY name"
    ).fetchall()


def _has_table(conn: sqlite3.Connection, name: str) -> bool:
    found = conn.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = ?", (name,))
    return found.fetchone() is not None


def plan_b_reassessments(
    conn: sqlite3.Connection, lo: str, hi: str, where: TallyFilter | None = None
) -> list[sqlite3.Row] | None:
    """Every reassessment of active Plan B cases with local date in [lo, hi) that match the
    filter: case id, case created_at, reassessment assessed_at. Cases never reassessed are not
    listed (count them from the tallies' plan_b). None without a reassessments table.
    """
    if not _has_table(conn, "reassessments"):
        return None
    extra, params = (where or TallyFilter()).case_where()
    # Reassessments are few next to cases, so walk them and look each case up by id
    # (CROSS JOIN keeps SQLite from scanning every case of the period instead).
    return conn.execute(
        "SELECT cases.id, cases.created_at, reassessments.assessed_at"
        " FROM reassessments CROSS JOIN cases ON cases.id = reassessments.case_id"
        " WHERE cases.status = 'active' AND cases.plan = 'B'"
        f" AND cases.created_at >= :lo AND cases.created_at < :hi{extra}",
        {"lo": lo, "hi": hi, **params},
    ).fetchall()


def follow_up_visits(
    conn: sqlite3.Connection, lo: str, hi: str, where: TallyFilter | None = None
) -> list[sqlite3.Row] | None:
    """Follow-up visits due in [lo, hi) of active cases matching the filter (not cancelled):
    due_date, status, done_at. None when this database has no follow-up table.
    """
    if not _has_table(conn, "followup_visits"):
        return None
    extra, params = (where or TallyFilter()).case_where()
    return conn.execute(
        "SELECT followup_visits.due_date, followup_visits.status, followup_visits.done_at"
        " FROM followup_visits CROSS JOIN cases ON cases.id = followup_visits.case_id"
        " WHERE cases.status = 'active' AND followup_visits.status != 'cancelled'"
        f" AND followup_visits.due_date >= :lo AND followup_visits.due_date < :hi{extra}",
        {"lo": lo, "hi": hi, **params},
    ).fetchall()
