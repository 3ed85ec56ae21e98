"""The append-only, hash-chained audit log: who did what to which record, never the content.

Triggers in the schema reject UPDATE and DELETE. Each row's hash covers its fields and the
previous row's hash, so an edit made behind SQLite's back breaks the chain at that row.
"""

from __future__ import annotations

import hashlib
import json
import sqlite3

GENESIS = "0" * 64


def _row_hash(prev_hash: str, fields: dict) -> str:
    payload = json.dumps(fields, sort_keys=True, separators=(",", ":"))
    return hashlib.sha256((prev_hash + payload).encode()).hexdigest()


def record(conn: sqlite3.Connection, *, at: str, user_id: int | None, action: str,
           record_type: str, record_id: str, device_id: str | None = None) -> None:
    """Append one entry. Call it inside the caller's write transaction."""
    last = conn.execute("SELECT hash FROM audit_log ORDER BY id DESC LIMIT 1").fetchone()
    prev = last["hash"] if last else GENESIS
    fields = {"at": at, "user_id": user_id, "device_id": device_id, "action": action,
              "record_type": record_type, "record_id": str(record_id)}
    conn.execute(
        "INSERT INTO audit_log (at, user_id, device_id, action, record_type, record_id,"
        " prev_hash, hash) VALUES (:at, :user_id, :device_id, :action, :record_type,"
        " :record_id, :prev_hash, :hash)",
        {**fields, "prev_hash": prev, "hash": _row_hash(prev, fields)})


def verify(conn: sqlite3.Connection) -> int | None:
    """Check the whole chain; return the id of the first broken row, or None when intact."""
    prev = GENESIS
    for row in conn.execute("SELECT * FROM audit_log ORDER BY id"):
        fields = {k: row[k] for k in ("at", "user_id", "device_id", "action", "record_type",
                                      "record_id")}
        if row["prev_hash"] != prev or row["hash"] != _row_hash(prev, fields):
            return row["id"]
        prev = row["hash"]
    return None


def count(conn: sqlite3.Connection) -> int:
    """How many entries the log holds."""
    return conn.execute("SELECT COUNT(*) FROM audit_log").fetchone()[0]


def entry(conn: sqlite3.Connection, entry_id: int) -> sqlite3.Row | None:
    """One log entry by id."""
    return conn.execute("SELECT * FROM audit_log WHERE id = ?", (entry_id,)).fetchone()


def entries(conn: sqlite3.Connection, *, limit: int = 200) -> list[sqlite3.Row]:
    return conn.execute("SELECT audit_log.*, users.username FROM audit_log"
                        " LEFT JOIN users ON users.id = audit_log.user_id"
                        " ORDER BY audit_log.id DESC LIMIT ?", (limit,)).fetchall()
