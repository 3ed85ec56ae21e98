"""Clinic settings: every change is a new version; the latest one is in force."""

from __future__ import annotations

import dataclasses
import json
import sqlite3

from clinic_app.clinical.types import ClinicSettings


def load(conn: sqlite3.Connection) -> ClinicSettings:
    """The settings in force (the package defaults until someone saves a version)."""
    row = conn.execute("SELECT data FROM settings_versions ORDER BY id DESC LIMIT 1").fetchone()
    if row is None:
        return ClinicSettings()
    known = {f.name for f in dataclasses.fields(ClinicSettings)}
    data = {k: v for k, v in json.loads(row["data"]).items() if k in known}
    return ClinicSettings(**data)


def save(conn: sqlite3.Connection, settings: ClinicSettings, *, user_id: int | None,
         at: str) -> int:
    """Store a new version and return its id."""
    cur = conn.execute(
        "INSERT INTO settings_versions (data, changed_by, changed_at) VALUES (?, ?, ?)",
        (json.dumps(dataclasses.asdict(settings), sort_keys=True), user_id, at))
    return cur.lastrowid


def history(conn: sqlite3.Connection) -> list[sqlite3.Row]:
    return conn.execute("SELECT * FROM settings_versions ORDER BY id DESC").fetchall()
