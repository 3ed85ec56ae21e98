"""Reassessments, monitoring entries, outcomes and follow-up visits of a case, plus the case
lists in a user's scope. Records made on a phone are stored once by id: the same payload again
is a duplicate, a different one a conflict kept apart (never overwriting).
"""

from __future__ import annotations

import json
import sqlite3

from clinic_app.storage.cases import ALL_CASES_ROLES, canonical_json

OUTCOMES = ("recovered_home", "referred", "admitted", "died", "lost_to_follow_up")

_TABLES = {
    "reassessment": ("reassessments", (
        "id", "case_id", "previous_id", "assessed_at", "received_at", "user_id", "device_id",
        "input", "result", "server_result", "engine_mismatch", "payload_hash", "severity",
        "plan", "transition", "send_for_iv")),
    "monitoring": ("monitoring_entries", (
        "id", "case_id", "at", "received_at", "user_id", "device_id", "kind", "what", "ml",
        "cups", "puffy_eyelids", "not_improving", "payload_hash")),
    "outcome": ("outcomes", (
        "id", "case_id", "outcome", "at", "received_at", "user_id", "device_id", "referred_to",
        "referred_at", "transport", "followup_date", "payload_hash")),
}


def store(conn: sqlite3.Connection, kind: str, row: dict, raw: dict) -> str:
    """Insert one record once: "created", "duplicate" or "conflict" (kept in
    followup_conflicts, the stored record untouched). Call inside a write transaction.
    A new outcome also sets the case's outcome column and books its follow-up visit.
    """
    table, columns = _TABLES[kind]
    existing = conn.execute(f"SELECT payload_hash FROM {table} WHERE id = ?",
                            (row["id"],)).fetchone()
    if existing is not None:
        if existing["payload_hash"] == row["payload_hash"]:
            return "duplicate"
        conn.execute(
            "INSERT OR IGNORE INTO followup_conflicts (kind, record_id, received_at, user_id,"
            " device_id, payload, payload_hash) VALUES (?, ?, ?, ?, ?, ?, ?)",
            (kind, row["id"], row["received_at"], row["user_id"], row.get("device_id"),
             canonical_json(raw), row["payload_hash"]))
        return "conflict"
    conn.execute(f"INSERT INTO {table} ({', '.join(columns)}) VALUES "
                 f"({', '.join(':' + c for c in columns)})", {c: row.get(c) for c in columns})
    if kind == "outcome":
        _after_outcome(conn, row)
    return "created"


def _after_outcome(conn: sqlite3.Connection, row: dict) -> None:
    # The latest outcome by the time it happened is the case's outcome (for the tallies).
    conn.execute("UPDATE cases SET outcome = (SELECT outcome FROM outcomes WHERE case_id = ?"
                 " ORDER BY at DESC, received_at DESC LIMIT 1) WHERE id = ?",
                 (row["case_id"], row["case_id"]))
    if row.get("followup_date"):
        conn.execute("INSERT OR IGNORE INTO followup_visits (case_id, outcome_id, due_date,"
                     " reason) VALUES (?, ?, ?, ?)",
                     (row["case_id"], row["id"], row["followup_date"],
                      row.get("followup_reason") or ""))


def conflicts(conn: sqlite3.Connection, kind: str, record_id: str) -> list[sqlite3.Row]:
    return conn.execute("SELECT * FROM followup_conflicts WHERE kind = ? AND record_id = ?"
                        " ORDER BY id", (kind, record_id)).fetchall()


def reassessments_for(conn: sqlite3.Connection, case_id: str) -> list[sqlite3.Row]:
    """The case's reassessments, oldest first (the chain after the first assessment)."""
    return conn.execute("SELECT * FROM reassessments WHERE case_id = ?"
                        " ORDER BY assessed_at, received_at", (case_id,)).fetchall()


def latest_reassessment(conn: sqlite3.Connection, case_id: str) -> sqlite3.Row | None:
    return conn.execute("SELECT * FROM reassessments WHERE case_id = ?"
                        " ORDER BY assessed_at DESC, received_at DESC LIMIT 1",
                        (case_id,)).fetchone()


def monitoring_for(conn: sqlite3.Connection, case_id: str) -> list[sqlite3.Row]:
    """Monitoring entries of a case in time order."""
    return conn.execute("SELECT * FROM monitoring_entries WHERE case_id = ?"
                        " ORDER BY at, received_at", (case_id,)).fetchall()


def outcomes_for(conn: sqlite3.Connection, case_id: str) -> list[sqlite3.Row]:
    return conn.execute("SELECT * FROM outcomes WHERE case_id = ? ORDER BY at, received_at",
                        (case_id,)).fetchall()


def visits_for(conn: sqlite3.Connection, case_id: str) -> list[sqlite3.Row]:
    return conn.execute("SELECT * FROM followup_visits WHERE case_id = ? ORDER BY due_date",
                        (case_id,)).fetchall()


def visit_done(conn: sqlite3.Connection, visit_id: int, user_id: int, at: str) -> None:
    conn.execute("UPDATE followup_visits SET status = 'done', done_at = ?, done_by = ?"
                 " WHERE id = ? AND status = 'due'", (at, user_id, visit_id))


def _scope(user) -> tuple[str, list]:
    if user["role"] in ALL_CASES_ROLES:
        return "cases.status = 'active'", []
    return "cases.status = 'active' AND cases.user_id = ?", [user["id"]]


def due_visits(conn: sqlite3.Connection, user, *, up_to: str) -> list[sqlite3.Row]:
    """Follow-up visits still to do, due on or before ``up_to`` (YYYY-MM-DD), in scope."""
    where, params = _scope(user)
    return conn.execute(
        "SELECT followup_visits.*, cases.household_ref, cases.area, cases.age_months"
        " FROM followup_visits JOIN cases ON cases.id = followup_visits.case_id"
        f" WHERE {where} AND followup_visits.status = 'due' AND followup_visits.due_date <= ?"
        " ORDER BY followup_visits.due_date", [*params, up_to]).fetchall()


def open_cases(conn: sqlite3.Connection, user, *, limit: int = 200) -> list[sqlite3.Row]:
    """Cases in scope with no outcome yet, newest first (the due list checks their plans)."""
    where, params = _scope(user)
    return conn.execute(f"SELECT * FROM cases WHERE {where} AND outcome IS NULL"
                        " ORDER BY created_at DESC LIMIT ?", [*params, limit]).fetchall()


def list_cases(conn: sqlite3.Connection, user, *, status: str = "", date_from: str = "",
               date_to: str = "", village: str = "", household_ref: str = "",
               limit: int = 200) -> list[sqlite3.Row]:
    """Cases in the user's scope, newest first. ``status``: "open", "closed" or one outcome.
    Dates are YYYY-MM-DD, inclusive, on the device's created_at. ``household_ref`` matches a
    prefix, case-insensitive."""
    where, params = _scope(user)
    clauses = [where]
    if status == "open":
        clauses.append("cases.outcome IS NULL")
    elif status == "closed":
        clauses.append("cases.outcome IS NOT NULL")
    elif status in OUTCOMES:
        clauses.append("cases.outcome = ?")
        params.append(status)
    if date_from:
        clauses.append("cases.created_at >= ?")
        params.append(date_from)
    if date_to:
        clauses.append("substr(cases.created_at, 1, 10) <= ?")
        params.append(date_to)
    if village:
        clauses.append("cases.area = ? COLLATE NOCASE")
        params.append(village)
    if household_ref:
        clauses.append("cases.household_ref LIKE ? ESCAPE '\\'")
        params.append(_like_prefix(household_ref))
    return conn.execute(f"SELECT * FROM cases WHERE {' AND '.join(clauses)}"
                        " ORDER BY cases.created_at DESC LIMIT ?", [*params, limit]).fetchall()


def villages(conn: sqlite3.Connection, user) -> list[str]:
    """The distinct areas of the cases in scope (for the village filter)."""
    where, params = _scope(user)
    return [r[0] for r in conn.execute(f"SELECT DISTINCT area FROM cases WHERE {where}"
                                       " AND area != '' ORDER BY area", params)]


def _like_prefix(text: str) -> str:
    return text.replace("\\", "\\\\").replace("%", "\\%").replace("_", "\\_") + "%"


def loads(value: str | None):
    """A stored JSON column as Python (None stays None)."""
    return None if value is None else json.loads(value)
