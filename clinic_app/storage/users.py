"""Users: accounts, roles and activation."""

from __future__ import annotations

import sqlite3

ROLES = ("chw", "nurse", "supervisor", "admin")


def create(conn: sqlite3.Connection, *, username: str, role: str, password_hash: str,
           created_at: str, display_name: str = "", area: str = "") -> int:
    """Insert a user; raises sqlite3.IntegrityError when the username is taken."""
    cur = conn.execute(
        "INSERT INTO users (username, role, password_hash, created_at, display_name, area)"
        " VALUES (?, ?, ?, ?, ?, ?)",
        (username, role, password_hash, created_at, display_name, area))
    return cur.lastrowid


def by_username(conn: sqlite3.Connection, username: str) -> sqlite3.Row | None:
    return conn.execute("SELECT * FROM users WHERE username = ?", (username,)).fetchone()


def by_id(conn: sqlite3.Connection, user_id: int) -> sqlite3.Row | None:
    return conn.execute("SELECT * FROM users WHERE id = ?", (user_id,)).fetchone()


def count(conn: sqlite3.Connection) -> int:
    """How many accounts exist (disabled ones included)."""
    return conn.execute("SELECT count(*) FROM users").fetchone()[0]


def all_users(conn: sqlite3.Connection) -> list[sqlite3.Row]:
    return conn.execute("SELECT * FROM users ORDER BY role, username").fetchall()


def set_password(conn: sqlite3.Connection, user_id: int, password_hash: str,
                 must_change: bool = False) -> None:
    conn.execute("UPDATE users SET password_hash = ?, must_change_password = ? WHERE id = ?",
                 (password_hash, int(must_change), user_id))


def set_active(conn: sqlite3.Connection, user_id: int, active: bool, at: str) -> None:
    """Enable or disable; disabling also ends every session and revokes every device."""
    conn.execute("UPDATE users SET active = ? WHERE id = ?", (int(active), user_id))
    if not active:
        conn.execute("DELETE FROM sessions WHERE user_id = ?", (user_id,))
        conn.execute("UPDATE devices SET revoked_at = COALESCE(revoked_at, ?) WHERE user_id = ?",
                     (at, user_id))
