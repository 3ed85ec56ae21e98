"""Cases: stored once by their device-made id; a re-send is a duplicate, a changed re-send a
conflict kept apart for review. Scope rules for reading live here too.
"""

from __future__ import annotations

import hashlib
import json
import sqlite3
from dataclasses import dataclass

# Roles that may read every case; a CHW reads only their own.
ALL_CASES_ROLES = ("nurse", "supervisor", "admin")

# The fields of a synced case that make up its payload (and so its hash).
PAYLOAD_FIELDS = ("id", "created_at", "area", "input", "result", "given", "referral_made",
                  "caregiver_language", "household_ref", "note")


def canonical_json(value: object) -> str:
    """The one JSON spelling used for hashing: sorted keys, no spaces."""
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False)


def payload_hash(case: dict) -> str:
    """sha256 of the canonical JSON of the payload fields (absent optional fields = null)."""
    payload = {name: case.get(name) for name in PAYLOAD_FIELDS}
    return hashlib.sha256(canonical_json(payload).encode()).hexdigest()


@dataclass(frozen=True)
class NewCase:
    """A validated case ready to store (built by the sync API or the server form)."""

    id: str
    created_at: str
    received_at: str
    user_id: int
    device_id: str | None
    area: str
    input: dict
    result: dict
    server_result: dict
    payload_hash: str
    ors_sachets: int = 0
    zinc_tablets: int = 0
    referral_made: bool = False
    caregiver_language: str = ""
    household_ref: str | None = None
    note: str | None = None
    quarantined: bool = False

    @property
    def engine_mismatch(self) -> bool:
        return canonical_json(self.result) != canonical_json(self.server_result)


def _row_values(case: NewCase) -> dict:
    server = case.server_result
    codes = list(server.get("classifications") or [])
    return {
        "id": case.id, "created_at": case.created_at, "received_at": case.received_at,
        "user_id": case.user_id, "device_id": case.device_id, "area": case.area,
        "input": canonical_json(case.input), "result": canonical_json(case.result),
        "server_result": canonical_json(server), "engine_mismatch": int(case.engine_mismatch),
        "payload_hash": case.payload_hash,
        "rulebook_version": str(server.get("rulebook_version") or ""),
        "ors_sachets": case.ors_sachets, "zinc_tablets": case.zinc_tablets,
        "referral_made": int(bool(case.referral_made)),
        "caregiver_language": case.caregiver_language, "household_ref": case.household_ref,
        "note": case.note, "status": "quarantined" if case.quarantined else "active",
        "severity": server["severity"], "plan": server["plan"], "refer": server["refer"],
        "classifications": canonical_json(codes),
        "danger_sign": int("very_severe_disease" in codes),
        "age_months": case.input["age_months"], "sex": case.input.get("sex"),
        "suspected_cholera": int("suspected_cholera" in codes),
    }


_COLUMNS = ("id", "created_at", "received_at", "user_id", "device_id", "area", "input", "result",
            "server_result", "engine_mismatch", "payload_hash", "rulebook_version",
            "ors_sachets", "zinc_tablets", "referral_made", "caregiver_language",
            "household_ref", "note", "status", "severity", "plan", "refer", "classifications",
            "danger_sign", "age_months", "sex", "suspected_cholera")
_INSERT = (f"INSERT INTO cases ({', '.join(_COLUMNS)}) VALUES "
           f"({', '.join(':' + c for c in _COLUMNS)})")


def upsert(conn: sqlite3.Connection, case: NewCase, raw_payload: dict) -> str:
    """Store a case once. Returns "created", "duplicate" (same id, same payload) or "conflict"
    (same id, different payload: the new payload goes to case_conflicts, the case is untouched).
    Call inside a write transaction.
    """
    existing = conn.execute("SELECT payload_hash FROM cases WHERE id = ?",
                            (case.id,)).fetchone()
    if existing is None:
        conn.execute(_INSERT, _row_values(case))
        return "created"
    if existing["payload_hash"] == case.payload_hash:
        return "duplicate"
    conn.execute(
        "INSERT OR IGNORE INTO case_conflicts (case_id, received_at, user_id, device_id, payload,"
        " payload_hash) VALUES (?, ?, ?, ?, ?, ?)",
        (case.id, case.received_at, case.user_id, case.device_id, canonical_json(raw_payload),
         case.payload_hash))
    return "conflict"


def get(conn: sqlite3.Connection, case_id: str) -> sqlite3.Row | None:
    """One case row by id, whatever the reader's scope."""
    return conn.execute("SELECT * FROM cases WHERE id = ?", (case_id,)).fetchone()


def get_case_for_user(conn: sqlite3.Connection, case_id: str, user) -> sqlite3.Row | None:
    """The case if ``user`` may see it, else None (a CHW sees only their own cases)."""
    row = get(conn, case_id)
    if row is None:
        return None
    if user["role"] in ALL_CASES_ROLES or row["user_id"] == user["id"]:
        return row
    return None


def as_json(row: sqlite3.Row) -> dict:
    """A case row as the API's JSON object."""
    return {
        "id": row["id"], "created_at": row["created_at"], "received_at": row["received_at"],
        "user_id": row["user_id"], "device_id": row["device_id"], "area": row["area"],
        "input": json.loads(row["input"]), "result": json.loads(row["result"]),
        "server_result": json.loads(row["server_result"]),
        "engine_mismatch": bool(row["engine_mismatch"]),
        "rulebook_version": row["rulebook_version"],
        "given": {"ors_sachets": row["ors_sachets"], "zinc_tablets": row["zinc_tablets"]},
        "referral_made": bool(row["referral_made"]),
        "caregiver_language": row["caregiver_language"], "household_ref": row["household_ref"],
        "note": row["note"], "status": row["status"], "outcome": row["outcome"],
    }


def conflict_json(row: sqlite3.Row) -> dict:
    """One kept conflicting payload as the API shows it to a reviewer."""
    return {"received_at": row["received_at"], "user_id": row["user_id"],
            "device_id": row["device_id"], "payload": json.loads(row["payload"]),
            "resolved_at": row["resolved_at"]}


def count(conn: sqlite3.Connection) -> int:
    return conn.execute("SELECT COUNT(*) FROM cases").fetchone()[0]


def conflicts_for(conn: sqlite3.Connection, case_id: str) -> list[sqlite3.Row]:
    return conn.execute("SELECT * FROM case_conflicts WHERE case_id = ? ORDER BY id",
                        (case_id,)).fetchall()
