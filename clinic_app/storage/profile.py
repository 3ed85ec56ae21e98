"""The clinic's non-clinical settings: its name and phone, the stock alert threshold, default languages.

Versioned like the clinical settings (every save is a new row, the newest is in force), but kept
apart from them: these do not change the rulebook, so a new clinic name does not make every
phone download a new rulebook.
"""

from __future__ import annotations

import dataclasses
import json
import sqlite3
from dataclasses import dataclass


@dataclass(frozen=True)
class ClinicProfile:
    clinic_name: str = ""
    clinic_phone: str = ""
    # Low-stock alert when ORS or zinc stock would last fewer weeks than this at recent use
    # (an operational choice of the clinic, not a clinical number).
    stock_alert_weeks: int = 4
    # Languages offered first for caregiver sheets and new users, as locale codes.
    default_languages: tuple[str, ...] = ("en",)


def load(conn: sqlite3.Connection) -> ClinicProfile:
    """The profile in force (the defaults until someone saves one)."""
    row = conn.execute(
        "SELECT data FROM clinic_profile_versions ORDER BY id DESC LIMIT 1"
    ).fetchone()
    if row is None:
        return ClinicProfile()
    known = {f.name for f in dataclasses.fields(ClinicProfile)}
    data = {k: v for k, v in json.loads(row[0]).items() if k in known}
    if "default_languages" in data:
        data["default_languages"] = tuple(data["default_languages"])
    return ClinicProfile(**data)


def save(conn: sqlite3.Connection, profile: ClinicProfile, *, user_id: int | None, at: str) -> int:
    """Store a new version and return its id. Call inside a write transaction."""
    cur = conn.execute(
        "INSERT INTO clinic_profile_versions (data, changed_by, changed_at) VALUES (?, ?, ?)",
        (json.dumps(dataclasses.asdict(profile), sort_keys=True), user_id, at),
    )
    return cur.lastrowid
