"""Registered phones and their sync tokens (stored hashed, shown once, revocable)."""

from __future__ import annotations

import hashlib
import secrets
import sqlite3
import uuid


def _digest(token: str) -> str:
    return hashlib.sha256(token.encode()).hexdigest()


def register(conn: sqlite3.Connection, user_id: int, *, label: str,
             created_at: str) -> tuple[str, str]:
    """Register a device; return (device_id, token). The token is not stored in clear."""
    device_id = str(uuid.uuid4())
    token = secrets.token_urlsafe(32)
    conn.execute("INSERT INTO devices (id, user_id, token_hash, label, created_at)"
                 " VALUES (?, ?, ?, ?, ?)", (device_id, user_id, _digest(token), label,
                                             created_at))
    return device_id, token


def by_token(conn: sqlite3.Connection, token: str) -> sqlite3.Row | None:
    """The device row for a token with its user's role and activity, revoked or not."""
    return conn.execute(
        "SELECT devices.*, users.username, users.role, users.active AS user_active"
        " FROM devices JOIN users ON users.id = devices.user_id WHERE token_hash = ?",
        (_digest(token),)).fetchone()


def touch(conn: sqlite3.Connection, device_id: str, at: str) -> None:
    conn.execute("UPDATE devices SET last_seen_at = ? WHERE id = ?", (at, device_id))


def revoke(conn: sqlite3.Connection, device_id: str, at: str) -> None:
    conn.execute("UPDATE devices SET revoked_at = COALESCE(revoked_at, ?) WHERE id = ?",
                 (at, device_id))


def all_devices(conn: sqlite3.Connection) -> list[sqlite3.Row]:
    return conn.execute("SELECT devices.*, users.username FROM devices"
                        " JOIN users ON users.id = devices.user_id"
                        " ORDER BY devices.created_at DESC").fetchall()
