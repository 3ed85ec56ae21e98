"""The SQLite door: pragmas, write transactions, migrations, the audit chain."""

from __future__ import annotations

import sqlite3
import threading

import pytest

from clinic_app.storage import audit, db


@pytest.fixture
def conn(tmp_path):
    conn = db.connect(str(tmp_path / "t.sqlite3"))
    db.migrate(conn)
    yield conn
    conn.close()


def test_connections_use_wal_foreign_keys_and_a_busy_timeout(conn):
    assert conn.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
    assert conn.execute("PRAGMA foreign_keys").fetchone()[0] == 1
    assert conn.execute("PRAGMA busy_timeout").fetchone()[0] >= 5000
    assert conn.execute("PRAGMA synchronous").fetchone()[0] == 2  # FULL: durable on ack


def test_a_failed_write_rolls_back_everything(conn):
    with pytest.raises(sqlite3.IntegrityError):
        with db.write(conn):
            conn.execute("INSERT INTO users (username, role, password_hash, created_at)"
                         " VALUES ('a', 'chw', 'h', 't')")
            conn.execute("INSERT INTO users (username, role, password_hash, created_at)"
                         " VALUES ('a', 'chw', 'h', 't')")
    assert conn.execute("SELECT count(*) FROM users").fetchone()[0] == 0


def test_concurrent_writers_wait_for_each_other_instead_of_failing(tmp_path, conn):
    path = str(tmp_path / "t.sqlite3")
    errors = []

    def writer(n):
        c = db.connect(path)
        try:
            for i in range(20):
                with db.write(c):
                    c.execute("INSERT INTO login_failures (username, address, at)"
                              " VALUES (?, 'x', ?)", (f"u{n}", i))
        except sqlite3.Error as exc:  # pragma: no cover - this is the failure being tested
            errors.append(exc)
        finally:
            c.close()

    threads = [threading.Thread(target=writer, args=(n,)) for n in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert errors == []
    assert conn.execute("SELECT count(*) FROM login_failures").fetchone()[0] == 80


def test_migrating_twice_applies_nothing_the_second_time(conn):
    assert db.migrate(conn) == []
    assert db.schema_version(conn) == db.migrations()[-1][0]


def test_the_audit_log_is_append_only_and_hash_chained(conn):
    with db.write(conn):
        for i in range(3):
            audit.record(conn, at=f"2026-12-02T09:0{i}:00Z", user_id=1, action="view",
                         record_type="case", record_id=f"c{i}")
    assert audit.verify(conn) is None
    with pytest.raises(sqlite3.IntegrityError, match="append-only"):
        conn.execute("UPDATE audit_log SET action = 'edit' WHERE id = 2")
    with pytest.raises(sqlite3.IntegrityError, match="append-only"):
        conn.execute("DELETE FROM audit_log WHERE id = 2")
    # Someone bypassing the triggers is caught by the chain, at the first broken row.
    conn.execute("DROP TRIGGER audit_log_no_update")
    conn.execute("UPDATE audit_log SET record_id = 'other' WHERE id = 2")
    assert audit.verify(conn) == 2


def test_a_thread_keeps_its_connection_idle_between_requests(app):
    """Closing the last connection of a WAL database copies the log into the database and
    deletes it, and a new connection reads the schema again: each thread keeps its own."""
    from pathlib import Path

    wal = Path(app.config["DATABASE"] + "-wal")
    with app.app_context():
        conn = db.get_db()
        with db.write(conn):
            conn.execute("INSERT INTO users (username, role, password_hash, created_at)"
                         " VALUES ('probe', 'chw', 'h', 't')")
    with app.app_context():
        assert db.get_db() is conn  # the same connection, idle in between
        assert not conn.in_transaction
    assert wal.exists() and wal.stat().st_size > 0  # not checkpointed by a close
    other = []
    thread = threading.Thread(target=lambda: other.append(_connection_in_app(app)))
    thread.start()
    thread.join()
    assert other and other[0] is not conn  # another thread, another connection
    db.release(app)
    with pytest.raises(sqlite3.ProgrammingError):
        conn.execute("SELECT 1")  # closed
    with app.app_context():
        assert db.get_db() is not conn


def _connection_in_app(app):
    with app.app_context():
        return db.get_db()


def test_a_transaction_left_open_is_rolled_back_at_the_end_of_the_request(app):
    with app.app_context():
        conn = db.get_db()
        conn.execute("BEGIN IMMEDIATE")
        conn.execute("INSERT INTO users (username, role, password_hash, created_at)"
                     " VALUES ('left-open', 'chw', 'h', 't')")
    assert not conn.in_transaction
    with app.app_context():
        found = db.get_db().execute("SELECT count(*) FROM users WHERE username = 'left-open'")
        assert found.fetchone()[0] == 0
