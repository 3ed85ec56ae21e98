"""The invented demo clinic: one builder for seed-demo, the tests and the browser tests.

Everything here is fiction of our own: the Lukanda Hills district, its villages and its staff.
"""

from __future__ import annotations

import sqlite3

from clinic_app import clock
from clinic_app.passwords import hash_password, verify_password
from clinic_app.storage import db, users

DISTRICT = "Lukanda Hills"
CLINIC = "Lukanda Hills Health Post"
VILLAGES = ("Mbeza", "Kantolo", "Siwelo", "Ndaruwa")

# (username, role, display name, area, password)
STAFF = (
    ("amina", "chw", "Amina Tembo", "Mbeza", "demo-chw-amina"),
    ("joseph", "chw", "Joseph Kalulu", "Kantolo", "demo-chw-joseph"),
    ("grace", "nurse", "Grace Nkhoma", "", "demo-nurse-grace"),
    ("tomas", "supervisor", "Tomas Phiri", "", "demo-super-tomas"),
    ("admin", "admin", "Clinic administrator", "", "demo-admin-pass"),
)


def seed(conn: sqlite3.Connection) -> list[tuple[str, str, str]]:
    """Create the demo staff when the database has no users; return (user, role, password)."""
    if conn.execute("SELECT count(*) FROM users").fetchone()[0]:
        return []
    at = clock.iso(clock.system_now())
    with db.write(conn):
        for username, role, name, area, password in STAFF:
            users.create(conn, username=username, role=role, password_hash=hash_password(password),
                         created_at=at, display_name=name, area=area)
    return [(u, r, p) for u, r, _n, _a, p in STAFF]


def working_logins(conn: sqlite3.Connection) -> list[tuple[str, str, str]]:
    """The demo logins that still work (their account is active and the password unchanged)."""
    working = []
    for username, role, _n, _a, password in STAFF:
        user = users.by_username(conn, username)
        if user and user["active"] and verify_password(user["password_hash"], password):
            working.append((username, role, password))
    return working
