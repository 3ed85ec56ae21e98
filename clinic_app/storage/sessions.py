"""Server-side sessions (revocable) and login-failure throttling."""

from __future__ import annotations

import hashlib
import secrets
import sqlite3


def _digest(token: str) -> str:
    return hashlib.sha256(token.encode()).hexdigest()


def create(conn: sqlite3.Connection, user_id: int, *, created_at: str, expires_at: str,
           address: str) -> str:
    """Create a session and return its token; only the token's hash is stored."""
    token = secrets.token_urlsafe(32)
    conn.execute("INSERT INTO sessions (id, user_id, created_at, expires_at, address)"
                 " VALUES (?, ?, ?, ?, ?)", (_digest(token), user_id, created_at, expires_at,
                                             address))
    return token


def user_for(conn: sqlite3.Connection, token: str, now: str) -> sqlite3.Row | None:
    """The active user owning an unexpired session token, or None."""
    return conn.execute(
        "SELECT users.* FROM sessions JOIN users ON users.id = sessions.user_id"
        " WHERE sessions.id = ? AND sessions.expires_at > ? AND users.active = 1",
        (_digest(token), now)).fetchone()


def delete(conn: sqlite3.Connection, token: str) -> None:
    conn.execute("DELETE FROM sessions WHERE id = ?", (_digest(token),))


def count_for_user(conn: sqlite3.Connection, user_id: int) -> int:
    return conn.execute("SELECT count(*) FROM sessions WHERE user_id = ?",
                        (user_id,)).fetchone()[0]


def record_failure(conn: sqlite3.Connection, username: str, address: str, at: float) -> None:
    conn.execute("INSERT INTO login_failures (username, address, at) VALUES (?, ?, ?)",
                 (username, address, at))


def recent_failures(conn: sqlite3.Connection, *, username: str, address: str,
                    since: float) -> tuple[int, int]:
    """Failures since ``since`` for this account and for this address."""
    by_user = conn.execute("SELECT count(*) FROM login_failures WHERE username = ? AND at > ?",
                           (username, since)).fetchone()[0]
    by_addr = conn.execute("SELECT count(*) FROM login_failures WHERE address = ? AND at > ?",
                           (address, since)).fetchone()[0]
    return by_user, by_addr


def clear_failures(conn: sqlite3.Connection, username: str, before: float) -> None:
    conn.execute("DELETE FROM login_failures WHERE username = ? OR at < ?", (username, before))
