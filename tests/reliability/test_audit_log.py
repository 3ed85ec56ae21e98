"""The audit log: append-only, hash-chained, and checked by ``flask audit verify``."""

from __future__ import annotations

import sqlite3

import pytest

from clinic_app.storage import audit, db
from tests.conftest import login


def _db(app) -> sqlite3.Connection:
    return db.connect(app.config["DATABASE"])


def _append(conn, n: int) -> None:
    with db.write(conn):
        for i in range(n):
            audit.record(conn, at=f"2026-12-02T09:{i:02d}:00Z", user_id=1, action="case.view",
                         record_type="case", record_id=f"c{i}")


def test_audit_verify_says_ok_on_an_intact_chain(app, runner):
    conn = _db(app)
    _append(conn, 5)
    conn.close()
    result = runner.invoke(args=["audit", "verify"])
    assert result.exit_code == 0, result.output
    assert "OK" in result.output and "5 entries" in result.output


def test_audit_verify_names_the_first_row_edited_behind_the_triggers(app, runner):
    conn = _db(app)
    _append(conn, 6)
    conn.execute("DROP TRIGGER audit_log_no_update")
    conn.execute("UPDATE audit_log SET record_id = 'someone-else' WHERE id = 4")
    conn.execute("UPDATE audit_log SET action = 'case.edit' WHERE id = 5")
    conn.close()
    result = runner.invoke(args=["audit", "verify"])
    assert result.exit_code == 1
    assert "row 4" in result.output and "BROKEN" in result.output


def test_audit_verify_catches_a_deleted_row(app, runner):
    conn = _db(app)
    _append(conn, 4)
    conn.execute("DROP TRIGGER audit_log_no_delete")
    conn.execute("DELETE FROM audit_log WHERE id = 2")
    conn.close()
    result = runner.invoke(args=["audit", "verify"])
    assert result.exit_code == 1
    assert "row 3" in result.output


def test_audit_verify_catches_a_rewritten_hash_that_does_not_chain(app, runner):
    conn = _db(app)
    _append(conn, 3)
    conn.execute("DROP TRIGGER audit_log_no_update")
    # A forger who recomputes row 2's own hash still breaks row 3's link to it.
    conn.execute("UPDATE audit_log SET record_id = 'x', hash = ? WHERE id = 2", ("f" * 64,))
    conn.close()
    assert runner.invoke(args=["audit", "verify"]).exit_code == 1


@pytest.mark.parametrize("statement", ["UPDATE audit_log SET action = 'edit'",
                                       "DELETE FROM audit_log"])
def test_sqlite_refuses_to_change_or_remove_audit_rows(app, statement):
    conn = _db(app)
    _append(conn, 2)
    with pytest.raises(sqlite3.IntegrityError, match="append-only"):
        conn.execute(statement)
    assert conn.execute("SELECT COUNT(*) FROM audit_log").fetchone()[0] == 2
    conn.close()


def test_logins_and_case_reads_through_the_app_leave_a_verifiable_chain(app, client, users,
                                                                        runner):
    for persona in ("chw", "nurse", "admin"):
        login(client, persona)
    conn = _db(app)
    actions = [r["action"] for r in conn.execute("SELECT action FROM audit_log ORDER BY id")]
    conn.close()
    assert actions.count("login") == 3
    assert runner.invoke(args=["audit", "verify"]).exit_code == 0
