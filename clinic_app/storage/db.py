"""SQLite connections, write transactions and numbered migrations.

Connections run in autocommit mode so that every write opens its own ``BEGIN IMMEDIATE``:
a deferred transaction that later needs the write lock fails at once under concurrent
writers instead of waiting for ``busy_timeout``.
"""

from __future__ import annotations

import re
import sqlite3
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from importlib import resources

from flask import current_app, g

BUSY_TIMEOUT_MS = 10_000
_MIGRATION_NAME = re.compile(r"^(\d{4})_[a-z0-9_]+\.sql$")


def connect(path: str) -> sqlite3.Connection:
    """Open a connection with the project's pragmas (WAL, foreign keys, busy timeout)."""
    conn = sqlite3.connect(path, isolation_level=None, check_same_thread=False,
                           timeout=BUSY_TIMEOUT_MS / 1000)
    conn.row_factory = sqlite3.Row
    conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
    conn.execute("PRAGMA journal_mode = WAL")
    conn.execute("PRAGMA foreign_keys = ON")
    # FULL: a commit is on disk before the phone is told "created", so an acknowledged case
    # survives a power cut too (NORMAL in WAL mode survives only a killed process).
    conn.execute("PRAGMA synchronous = FULL")
    return conn


@contextmanager
def write(conn: sqlite3.Connection) -> Iterator[sqlite3.Connection]:
    """A write transaction: BEGIN IMMEDIATE, COMMIT on success, ROLLBACK on any error."""
    conn.execute("BEGIN IMMEDIATE")
    try:
        yield conn
    except BaseException:
        conn.execute("ROLLBACK")
        raise
    conn.execute("COMMIT")


_POOL = "clinic_app.storage.connections"


class _ThreadConnections(threading.local):
    """The connection of each server thread to one database, kept between requests.

    Opening a connection is cheap, but its first statement reads the whole schema (0.4 ms, a
    fifth of a short request), and closing the last connection to a WAL database copies the
    log into the database, syncs it and deletes it (0.6 ms more for a request that wrote).
    The server's threads live as long as the server, so each keeps its connection; SQLite then
    checkpoints the log itself every 1000 pages. Between requests a connection is idle in
    autocommit mode: it holds no lock and no transaction (``close_db`` makes sure).
    """

    conn: sqlite3.Connection | None = None


def get_db() -> sqlite3.Connection:
    """The connection of the current thread (opened on first use, kept for the next request)."""
    if "db" not in g:
        app = current_app._get_current_object()
        pool = app.extensions.get(_POOL)
        if pool is None:
            pool = app.extensions.setdefault(_POOL, _ThreadConnections())
        if pool.conn is None:
            pool.conn = connect(app.config["DATABASE"])
        g.db = pool.conn
    return g.db


def close_db(_exc=None) -> None:
    """End of request: leave the thread's connection idle, or drop it if it is not."""
    conn = g.pop("db", None)
    if conn is None or not conn.in_transaction:
        return
    try:
        conn.execute("ROLLBACK")  # a transaction left open by an error path
    except sqlite3.Error:
        pool = current_app.extensions.get(_POOL)
        if pool is not None and pool.conn is conn:
            pool.conn = None
        conn.close()


def release(app) -> None:
    """Close the app's kept connections (each thread opens a new one when it next needs it).

    For maintenance and tests, e.g. before a disk is remounted read-only: a connection that
    is open for writing stops that.
    """
    pool = app.extensions.pop(_POOL, None)
    if pool is not None and pool.conn is not None:
        pool.conn.close()
    # The other threads' connections go with the pool's per-thread storage.


def migrations() -> list[tuple[int, str, str]]:
    """All migration files as (number, name, sql), in number order."""
    found = []
    for entry in resources.files("clinic_app.storage").joinpath("migrations").iterdir():
        match = _MIGRATION_NAME.match(entry.name)
        if match:
            found.append((int(match.group(1)), entry.name, entry.read_text(encoding="utf-8")))
    return sorted(found)


def schema_version(conn: sqlite3.Connection) -> int:
    return conn.execute("PRAGMA user_version").fetchone()[0]


def migrate(conn: sqlite3.Connection) -> list[str]:
    """Apply the migrations newer than PRAGMA user_version; return the names applied."""
    applied = []
    current = schema_version(conn)
    for number, name, sql in migrations():
        if number <= current:
            continue
        # executescript commits first, so the version bump rides in the same script.
        try:
            conn.executescript(
                f"BEGIN IMMEDIATE;\n{sql}\nPRAGMA user_version = {number};\nCOMMIT;")
        except sqlite3.Error:
            if conn.in_transaction:
                conn.execute("ROLLBACK")
            raise
        applied.append(name)
    return applied


def init_app(app) -> None:
    app.teardown_appcontext(close_db)
