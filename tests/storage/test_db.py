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


def test_the_app_keeps_one_idle_connection_so_a_request_closes_without_a_checkpoint(app):
    """With no other connection open, closing the last one copies the log into the database
    and deletes it; the app's idle connection spares each request that (storage.db)."""
    from pathlib import Path

    wal = Path(app.config["DATABASE"] + "-wal")
    with app.app_context():
        conn = db.get_db()
        with db.write(conn):
            conn.execute("INSERT INTO users (username, role, password_hash, created_at)"
                         " VALUES ('probe', 'chw', 'h', 't')")
    # The request's connection is closed; the log is still there, so no checkpoint ran.
    assert wal.exists() and wal.stat().st_size > 0
    keeper = app.extensions["clinic_app.storage.keeper"]
    assert not keeper.in_transaction
    db.release(app)
    assert "clinic_app.storage.keeper" not in app.extensions
    with pytest.raises(sqlite3.ProgrammingError):
        keeper.execute("SELECT 1")  # closed
    # The last connection closed: SQLite checkpointed and removed the log.
    assert not wal.exists()


def test_an_idle_connection_that_cannot_open_does_not_stop_the_request(app, monkeypatch):
    real = db.connect
    calls = []

    def first_fails(path):
        calls.append(path)
        if len(calls) == 1:
            raise sqlite3.OperationalError("unable to open database file")
        return real(path)

    monkeypatch.setattr(db, "connect", first_fails)
    with app.app_context():
        assert db.get_db().execute("SELECT 1").fetchone()[0] == 1
    assert len(calls) == 2 and "clinic_app.storage.keeper" not in app.extensions
