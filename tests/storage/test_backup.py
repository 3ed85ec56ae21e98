"""Online backups, checked restores and the daily rotation."""

import datetime as dt
import os
import sqlite3
import threading

import pytest

from clinic_app.storage.backup import (
    BackupError,
    backup,
    check_backup,
    daily_backups,
    last_backup_time,
    maybe_daily_backup,
    restore,
)

NOW = dt.datetime(2026, 12, 2, 14, 0, tzinfo=dt.UTC)


def _clinic_db(path, rows=0):
    """A small database with the clinic's required tables, in WAL mode like the server's."""
    conn = sqlite3.connect(path, isolation_level=None)
    conn.execute("PRAGMA journal_mode = WAL")
    conn.executescript(
        """
        CREATE TABLE users (id INTEGER PRIMARY KEY, username TEXT);
        CREATE TABLE audit_log (id INTEGER PRIMARY KEY, action TEXT);
        CREATE TABLE settings_versions (id INTEGER PRIMARY KEY, data TEXT);
        CREATE TABLE records (id INTEGER PRIMARY KEY, body TEXT NOT NULL);
        CREATE TABLE record_log (record_id INTEGER NOT NULL);
        PRAGMA user_version = 3;
        """
    )
    for i in range(1, rows + 1):
        conn.execute("INSERT INTO records VALUES (?, ?)", (i, f"record {i} " + "x" * 200))
    conn.close()
    return path


def _ids(path):
    conn = sqlite3.connect(path)
    try:
        return [row[0] for row in conn.execute("SELECT id FROM records ORDER BY id")]
    finally:
        conn.close()


def _integrity(path):
    conn = sqlite3.connect(path)
    try:
        return conn.execute("PRAGMA integrity_check").fetchall()
    finally:
        conn.close()


def _wait_for(condition, limit=20_000):
    event = threading.Event()
    for _ in range(limit):
        if condition():
            return
        event.wait(0.005)
    raise AssertionError("condition never became true")


def test_a_backup_under_concurrent_writes_restores_every_acknowledged_record(tmp_path):
    db = _clinic_db(tmp_path / "clinic.sqlite3")
    acknowledged = []
    stop = threading.Event()
    failures = []

    def writer():
        conn = sqlite3.connect(db, isolation_level=None, timeout=10)
        try:
            record_id = 0
            while not stop.is_set():
                record_id += 1
                conn.execute("BEGIN IMMEDIATE")
                conn.execute("INSERT INTO records VALUES (?, ?)", (record_id, "y" * 300))
                conn.execute("INSERT INTO record_log VALUES (?)", (record_id,))
                conn.execute("COMMIT")
                acknowledged.append(record_id)  # only after COMMIT returned
        except sqlite3.Error as exc:  # pragma: no cover - reported below
            failures.append(exc)
        finally:
            conn.close()

    thread = threading.Thread(target=writer)
    thread.start()
    try:
        _wait_for(lambda: len(acknowledged) >= 300)
        acknowledged_before = list(acknowledged)
        backup(db, tmp_path / "backup.sqlite3")
        _wait_for(lambda: len(acknowledged) >= len(acknowledged_before) + 300)
    finally:
        stop.set()
        thread.join(30)
    assert not failures

    restored = tmp_path / "restored.sqlite3"
    restore(tmp_path / "backup.sqlite3", restored)
    ids = _ids(restored)
    assert _integrity(restored) == [("ok",)]
    assert set(acknowledged_before) <= set(ids)
    # One snapshot: a gap-free prefix with both rows of every transaction, none half-copied.
    assert ids == list(range(1, len(ids) + 1))
    conn = sqlite3.connect(restored)
    assert conn.execute("SELECT COUNT(*) FROM record_log").fetchone()[0] == len(ids)
    conn.close()
    # The writer really kept writing past the snapshot, so the copy ran under load.
    assert len(ids) < len(acknowledged)


WRITER = """
import sqlite3, sys
conn = sqlite3.connect(sys.argv[1], isolation_level=None, timeout=10)
acks = open(sys.argv[2], "a", buffering=1)
for record_id in range(1, 1_000_000):
    conn.execute("BEGIN IMMEDIATE")
    conn.execute("INSERT INTO records VALUES (?, ?)", (record_id, "z" * 300))
    conn.execute("INSERT INTO record_log VALUES (?)", (record_id,))
    conn.execute("COMMIT")
    acks.write(f"{record_id}\\n")  # acknowledged only once COMMIT returned
"""


def test_a_backup_while_another_process_writes_holds_every_acknowledged_record(tmp_path):
    import subprocess
    import sys

    db = _clinic_db(tmp_path / "clinic.sqlite3")
    acks = tmp_path / "acks.txt"
    acks.touch()
    writer = subprocess.Popen([sys.executable, "-c", WRITER, str(db), str(acks)])

    def acknowledged():
        return [int(line) for line in acks.read_text().splitlines() if line.strip()]

    try:
        _wait_for(lambda: len(acknowledged()) >= 300)
        before = acknowledged()
        backup(db, tmp_path / "backup.sqlite3")
        _wait_for(lambda: len(acknowledged()) >= len(before) + 300)
    finally:
        writer.kill()
        writer.wait()
    restored = tmp_path / "restored.sqlite3"
    restore(tmp_path / "backup.sqlite3", restored)
    ids = _ids(restored)
    assert _integrity(restored) == [("ok",)]
    assert set(before) <= set(ids)
    assert ids == list(range(1, len(ids) + 1))
    assert len(ids) < len(acknowledged())


def test_a_backup_can_be_taken_from_an_open_connection(tmp_path):
    db = _clinic_db(tmp_path / "clinic.sqlite3", rows=5)
    conn = sqlite3.connect(db, isolation_level=None)
    conn.execute("INSERT INTO records VALUES (6, 'written on this connection')")
    backup(conn, tmp_path / "copy.sqlite3")
    conn.close()
    assert _ids(tmp_path / "copy.sqlite3") == [1, 2, 3, 4, 5, 6]


def test_a_backup_is_one_self_contained_file(tmp_path):
    db = _clinic_db(tmp_path / "clinic.sqlite3", rows=3)
    dest = backup(db, tmp_path / "out" / "copy.sqlite3")
    assert sorted(p.name for p in dest.parent.iterdir()) == ["copy.sqlite3"]
    conn = sqlite3.connect(dest)
    assert conn.execute("PRAGMA journal_mode").fetchone()[0] == "delete"
    conn.close()


def test_restore_replaces_a_live_wal_database_and_keeps_a_safety_copy(tmp_path):
    good = backup(_clinic_db(tmp_path / "old.sqlite3", rows=4), tmp_path / "good.sqlite3")
    live = _clinic_db(tmp_path / "live.sqlite3", rows=9)
    holder = sqlite3.connect(live, isolation_level=None)  # keeps the -wal file in use
    holder.execute("INSERT INTO records VALUES (10, 'only in the wal')")
    restore(good, live, safety_copy=tmp_path / "before-restore.sqlite3")
    assert [row[0] for row in holder.execute("SELECT id FROM records ORDER BY id")] == [1, 2, 3, 4]
    holder.close()
    assert _ids(live) == [1, 2, 3, 4]
    assert _integrity(live) == [("ok",)]
    assert _ids(tmp_path / "before-restore.sqlite3") == list(range(1, 11))


def _corrupt_middle(path):
    size = os.path.getsize(path)
    with open(path, "r+b") as handle:
        handle.seek(size // 2)
        handle.write(b"\xde\xad\xbe\xef" * 2048)


def _bad_empty(tmp_path):
    (tmp_path / "bad").write_bytes(b"")


def _bad_text(tmp_path):
    (tmp_path / "bad").write_text("patient,age\nA,3\n")


def _bad_truncated(tmp_path):
    good = backup(_clinic_db(tmp_path / "src.sqlite3", rows=400), tmp_path / "good.sqlite3")
    (tmp_path / "bad").write_bytes(good.read_bytes()[: good.stat().st_size // 2])


def _bad_corrupt_pages(tmp_path):
    good = backup(_clinic_db(tmp_path / "src.sqlite3", rows=400), tmp_path / "bad")
    _corrupt_middle(good)


def _bad_foreign_schema(tmp_path):
    conn = sqlite3.connect(tmp_path / "bad")
    conn.execute("CREATE TABLE photos (id INTEGER PRIMARY KEY)")
    conn.execute("PRAGMA user_version = 3")
    conn.close()


@pytest.mark.parametrize(
    "make_bad, message",
    [
        pytest.param(_bad_empty, "is empty", id="empty"),
        pytest.param(_bad_text, "not an SQLite database", id="not-sqlite"),
        pytest.param(_bad_truncated, "damaged", id="truncated"),
        pytest.param(_bad_corrupt_pages, "damaged", id="corrupt-pages"),
        pytest.param(_bad_foreign_schema, "not one of this clinic app", id="other-schema"),
    ],
)
def test_restore_refuses_a_bad_file_and_changes_nothing(tmp_path, make_bad, message):
    live = _clinic_db(tmp_path / "live.sqlite3", rows=7)
    make_bad(tmp_path)
    with pytest.raises(BackupError, match=message):
        restore(tmp_path / "bad", live)
    assert _ids(live) == list(range(1, 8))


def test_restore_refuses_a_missing_file(tmp_path):
    with pytest.raises(BackupError, match="is not a file"):
        restore(tmp_path / "nowhere.sqlite3", tmp_path / "live.sqlite3")


def test_check_refuses_a_backup_from_a_newer_schema(tmp_path):
    db = _clinic_db(tmp_path / "clinic.sqlite3")
    assert check_backup(db, max_version=3) == 3
    with pytest.raises(BackupError, match="newer version of the app"):
        check_backup(db, max_version=2)


def test_the_daily_backup_runs_once_per_day(tmp_path):
    db = _clinic_db(tmp_path / "clinic.sqlite3", rows=2)
    backups = tmp_path / "backups"
    assert last_backup_time(backups) is None
    first = maybe_daily_backup(db, backups, NOW)
    assert first is not None and _ids(first) == [1, 2]
    assert maybe_daily_backup(db, backups, NOW + dt.timedelta(hours=9)) is None
    assert last_backup_time(backups) == NOW
    assert maybe_daily_backup(db, backups, NOW + dt.timedelta(hours=10)) is not None
    assert last_backup_time(backups) == NOW + dt.timedelta(hours=10)  # 00:00 UTC next day


def test_the_daily_rotation_keeps_the_last_14(tmp_path):
    db = _clinic_db(tmp_path / "clinic.sqlite3", rows=1)
    backups = tmp_path / "backups"
    (backups).mkdir()
    (backups / "manual-keep-me.sqlite3").write_bytes(b"not ours to rotate")
    for day in range(20):
        maybe_daily_backup(db, backups, NOW + dt.timedelta(days=day))
    kept = [taken for taken, _path in daily_backups(backups)]
    assert kept == [NOW + dt.timedelta(days=day) for day in range(6, 20)]
    assert (backups / "manual-keep-me.sqlite3").exists()
