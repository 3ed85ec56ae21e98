"""The alert list: alerts raised by the surveillance rules, acknowledged with a comment."""

from __future__ import annotations

import json
import sqlite3

KINDS = ("cholera_cluster", "cholera_death", "ears", "low_stock")


def upsert(
    conn: sqlite3.Connection, *, key: str, kind: str, area: str, week: str, raised_at: str,
    detail: dict,
) -> bool:
    """Raise an alert once per key; an open alert's detail is refreshed. True when new.

    Call inside a write transaction. An acknowledged alert is left as it was acknowledged.
    """
    existing = conn.execute("SELECT id FROM alerts WHERE key = ?", (key,)).fetchone()
    payload = json.dumps(detail, sort_keys=True)
    if existing is None:
        conn.execute(
            "INSERT INTO alerts (key, kind, area, week, raised_at, detail)"
            " VALUES (?, ?, ?, ?, ?, ?)",
            (key, kind, area, week, raised_at, payload),
        )
        return True
    conn.execute(
        "UPDATE alerts SET detail = ? WHERE id = ? AND acknowledged_at IS NULL",
        (payload, existing["id"]),
    )
    return False


def listing(conn: sqlite3.Connection, *, open_only: bool = False, limit: int = 200) -> list[dict]:
    """Alerts, open ones first then newest first, with the acknowledging user's name."""
    rows = conn.execute(
        "SELECT alerts.*, coalesce(nullif(users.display_name, ''), users.username) AS ack_name"
        " FROM alerts LEFT JOIN users ON users.id = alerts.acknowledged_by"
        + (" WHERE alerts.acknowledged_at IS NULL" if open_only else "")
        + " ORDER BY alerts.acknowledged_at IS NOT NULL, alerts.raised_at DESC, alerts.id DESC"
        " LIMIT ?",
        (limit,),
    ).fetchall()
    return [{**dict(row), "detail": json.loads(row["detail"])} for row in rows]


def get(conn: sqlite3.Connection, alert_id: int) -> sqlite3.Row | None:
    """One alert by id."""
    return conn.execute("SELECT * FROM alerts WHERE id = ?", (alert_id,)).fetchone()


def acknowledge(
    conn: sqlite3.Connection, alert_id: int, *, user_id: int, at: str, comment: str
) -> bool:
    """Acknowledge an open alert with a comment; False if it was already acknowledged."""
    done = conn.execute(
        "UPDATE alerts SET acknowledged_at = ?, acknowledged_by = ?, comment = ?"
        " WHERE id = ? AND acknowledged_at IS NULL",
        (at, user_id, comment, alert_id),
    )
    return done.rowcount == 1


def cholera_case_rows(
    conn: sqlite3.Connection, since_day: str, until_day: str, min_age_months: float
) -> list:
    """Active cases from ``since_day`` up to (not including) ``until_day``, aged at least
    ``min_age_months``, that could count toward a cholera alert: suspected cholera, severe
    dehydration, or a death.

    ``blood`` and ``days`` come from the stored assessment input (AWD = watery and acute).
    """
    return conn.execute(
        "SELECT id, area, created_at, age_months, severity, suspected_cholera, outcome,"
        " json_extract(input, '$.blood_in_stool') AS blood,"
        " json_extract(input, '$.diarrhoea_days') AS days"
        " FROM cases INDEXED BY cases_alert_scan"
        " WHERE created_at >= ? AND created_at < ? AND status = 'active' AND age_months >= ?"
        " AND (suspected_cholera != 0 OR severity = 'severe' OR outcome = 'died')"
        " ORDER BY created_at",
        (since_day, until_day, min_age_months),
    ).fetchall()
