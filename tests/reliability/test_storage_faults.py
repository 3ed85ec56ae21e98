"""A full or read-only database: the sync upload answers a clear JSON error, stores no part of
the batch, and the same batch goes through once the disk is writable again.

The disk is a real one: a tiny tmpfs mounted for the test (needs root, which this machine's
test runs have); without root the read-only case falls back to chmod and the full-disk case is
skipped.
"""

from __future__ import annotations

import os
import sqlite3
import subprocess
import uuid

import pytest

from clinic_app import create_app
from clinic_app.storage import db
from tests.conftest import PASSWORD, TEST_CONFIG, login

BATCH = 60


def _mount(*args: str) -> bool:
    return subprocess.run(["mount", *args], capture_output=True).returncode == 0


@pytest.fixture
def small_disk(tmp_path):
    """An 8 MB tmpfs of its own, or None when this process may not mount one."""
    disk = tmp_path / "disk"
    disk.mkdir()
    if os.geteuid() != 0 or not _mount("-t", "tmpfs", "-o", "size=8m,mode=0755", "tmpfs",
                                       str(disk)):
        yield None
        return
    try:
        yield disk
    finally:
        subprocess.run(["umount", "-l", str(disk)], capture_output=True)


def _app_on(directory):
    app = create_app({**TEST_CONFIG, "DATABASE": str(directory / "clinic.sqlite3")})
    from clinic_app.cli import add_user

    with app.app_context():
        conn = db.connect(app.config["DATABASE"])
        db.migrate(conn)
        add_user(conn, "chw", "chw", PASSWORD)
        conn.close()
    return app


def _phone(app) -> dict:
    client = app.test_client()
    csrf = login(client, "chw")
    token = client.post("/api/v1/devices", json={"label": "p"},
                        headers={"X-CSRFToken": csrf}).get_json()["token"]
    return {"Authorization": f"Bearer {token}", "X-Clinic-Sync": "1"}


def _batch() -> list[dict]:
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import ClinicSettings

    inputs = {"age_months": 30, "weight_kg": 12,
              "signs": {"condition": "restless", "eyes": "sunken", "drinking": "eager",
                        "skin_pinch": "slow"}}
    result = assess(inputs, ClinicSettings())
    # Long notes make each case take several pages, so the batch cannot fit in a few KB.
    return [{"id": str(uuid.uuid4()), "created_at": "2026-12-01T09:00:00Z", "area": "Mbeza",
             "input": inputs, "result": result, "given": {"ors_sachets": 2, "zinc_tablets": 10},
             "referral_made": False, "caregiver_language": "en", "note": "n" * 1900}
            for _ in range(BATCH)]


def _stored(app, batch) -> int:
    conn = sqlite3.connect(app.config["DATABASE"])
    try:
        ids = [case["id"] for case in batch]
        marks = ",".join("?" * len(ids))
        return conn.execute(f"SELECT COUNT(*) FROM cases WHERE id IN ({marks})", ids
                            ).fetchone()[0]
    finally:
        conn.close()


def _checkpoint(app) -> None:
    # An empty write-ahead log: every new page must take fresh space on the disk.
    conn = sqlite3.connect(app.config["DATABASE"])
    conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    conn.close()


def _fill(filler, *, leave_bytes: int) -> None:
    """Fill the disk with ``filler``, then give back ``leave_bytes``."""
    fd = os.open(filler, os.O_WRONLY | os.O_CREAT)
    try:
        while True:
            os.write(fd, b"\0" * 4096)
    except OSError:
        pass
    finally:
        os.close(fd)
    os.truncate(filler, max(0, filler.stat().st_size - leave_bytes))


def _assert_clear_storage_error(response, code: str) -> None:
    assert response.status_code == 503, response.get_data(as_text=True)
    error = response.get_json()["error"]
    assert error["code"] == code
    assert "Nothing" in error["message"] and "Traceback" not in response.get_data(as_text=True)


def test_a_full_disk_gives_a_clear_error_and_stores_no_part_of_the_batch(small_disk):
    if small_disk is None:
        pytest.skip("needs root to mount a tiny tmpfs")
    app = _app_on(small_disk)
    headers = _phone(app)
    client = app.test_client()
    _checkpoint(app)
    filler = small_disk / "filler"
    # Leave room for a case or two, not for the batch: a per-case commit would half-store it.
    _fill(filler, leave_bytes=256 * 1024)
    batch = _batch()
    response = client.post("/api/v1/cases", json={"cases": batch}, headers=headers)
    _assert_clear_storage_error(response, "storage_full")
    assert _stored(app, batch) == 0
    filler.unlink()
    retry = client.post("/api/v1/cases", json={"cases": batch}, headers=headers)
    assert retry.status_code == 200, retry.get_data(as_text=True)
    assert {r["status"] for r in retry.get_json()["results"]} == {"created"}
    assert _stored(app, batch) == BATCH


def test_a_read_only_database_gives_a_clear_error_and_stores_nothing(small_disk, tmp_path):
    directory = small_disk or tmp_path
    app = _app_on(directory)
    headers = _phone(app)
    client = app.test_client()
    _checkpoint(app)
    files = [p for p in directory.iterdir() if p.name.startswith("clinic.sqlite3")]
    # The app keeps its connections open between requests (storage.db.get_db): one opened
    # before the change would still write, and a remount to read-only waits for none to be
    # open for writing.
    db.release(app)
    if small_disk is not None:
        assert _mount("-o", "remount,ro", str(small_disk))
    else:
        for path in files:
            path.chmod(0o444)
    batch = _batch()
    try:
        response = client.post("/api/v1/cases", json={"cases": batch}, headers=headers)
        _assert_clear_storage_error(response, "storage_read_only")
    finally:
        if small_disk is not None:
            assert _mount("-o", "remount,rw", str(small_disk))
        else:
            for path in files:
                path.chmod(0o644)
    assert _stored(app, batch) == 0
    retry = client.post("/api/v1/cases", json={"cases": batch}, headers=headers)
    assert retry.status_code == 200, retry.get_data(as_text=True)
    assert _stored(app, batch) == BATCH


def test_a_full_disk_stores_no_part_of_a_batch_of_bedside_entries(small_disk):
    if small_disk is None:
        pytest.skip("needs root to mount a tiny tmpfs")
    app = _app_on(small_disk)
    headers = _phone(app)
    client = app.test_client()
    case = _batch()[0]
    assert client.post("/api/v1/cases", json={"cases": [case]}, headers=headers
                       ).status_code == 200
    entries = [{"id": str(uuid.uuid4()), "case_id": case["id"], "at": "2026-12-01T10:00:00Z",
                "what": "ors", "ml": 50} for _ in range(400)]
    _checkpoint(app)
    filler = small_disk / "filler"
    _fill(filler, leave_bytes=64 * 1024)
    response = client.post("/api/v1/monitoring", json={"entries": entries}, headers=headers)
    _assert_clear_storage_error(response, "storage_full")
    conn = sqlite3.connect(app.config["DATABASE"])
    assert conn.execute("SELECT COUNT(*) FROM audit_log WHERE action = 'monitoring.create'"
                        ).fetchone()[0] == 0
    filler.unlink()
    retry = client.post("/api/v1/monitoring", json={"entries": entries}, headers=headers)
    assert retry.status_code == 200, retry.get_data(as_text=True)
    assert conn.execute("SELECT COUNT(*) FROM audit_log WHERE action = 'monitoring.create'"
                        ).fetchone()[0] == 400
    conn.close()
