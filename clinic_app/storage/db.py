"""SQLite connections, write transactions and numbered migrations.

Connections run in autocommit mode so that every write opens its own ``BEGIN IMMEDIATE``:
a deferred transaction that later needs the write lock fails at once under concurrent
writers instead of waiting for ``busy_timeout``.
"""

from __future__ import annotations

import re
import sqlite3
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


_KEEPER = "clinic_app.storage.keeper"


def _keep_open(app) -> None:
    """Hold one idle connection to the app's database for the life of the app.

    When the last connection to a WAL database closes, SQLite copies the log into the
    database, syncs it and deletes the log: with a connection per request, every request that
    wrote paid for that (half the time of a short request). While this one stays open, a
    request's connection closes cheaply and SQLite checkpoints the log in the background of
    commits, every 1000 pages. The idle connection holds no lock and starts no transaction.
    """
    if _KEEPER in app.extensions:
        return
    try:
        keeper = connect(app.config["DATABASE"])
    except sqlite3.Error:
        return  # only a saving: the request's own connection reports what is wrong
    if app.extensions.setdefault(_KEEPER, keeper) is not keeper:
        keeper.close()  # another thread opened one first


def release(app) -> None:
    """Close the idle connection of ``_keep_open`` (the next request opens another)."""
    keeper = app.extensions.pop(_KEEPER, None)
    if keeper is not None:
        keeper.close()


def get_db() -> sqlite3.Connection:
    """The connection of the current request (opened on first use, closed at teardown)."""
    if "db" not in g:
        _keep_open(current_app)
        g.db = connect(current_app.config["DATABASE"])
    return g.db


def close_db(_exc=None) -> None:
    db = g.pop("db", None)
    if db is not None:
        db.close()


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
