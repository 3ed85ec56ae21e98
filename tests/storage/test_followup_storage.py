"""Follow-up storage: exactly-once records, the case's outcome column, visits, list filters."""

from __future__ import annotations

import pytest

from clinic_app.storage import db
from clinic_app.storage import followup as store
from clinic_app.storage.db import write
from tests.web.followup_helpers import seed_case


@pytest.fixture
def conn(app):
    connection = db.connect(app.config["DATABASE"])
    yield connection
    connection.close()


def outcome_row(case_id, rid, outcome, at, **extra):
    return {"id": rid, "case_id": case_id, "outcome": outcome, "at": at,
            "received_at": "2026-03-02T12:00:00Z", "user_id": 1, "payload_hash": rid + at,
            **extra}


def test_the_latest_outcome_by_time_is_the_cases_outcome(app, users, conn):
    case_id = seed_case(app, users["chw"])
    with write(conn):
        store.store(conn, "outcome", outcome_row(case_id, "o2", "admitted",
                                                 "2026-03-02T11:00:00Z"), {})
        # Synced later, but it happened earlier: it does not replace the later outcome.
        store.store(conn, "outcome", outcome_row(case_id, "o1", "referred",
                                                 "2026-03-02T10:00:00Z"), {})
    assert conn.execute("SELECT outcome FROM cases").fetchone()[0] == "admitted"


def test_a_changed_resend_is_kept_apart_and_changes_nothing(app, users, conn):
    case_id = seed_case(app, users["chw"])
    first = outcome_row(case_id, "o1", "referred", "2026-03-02T10:00:00Z")
    with write(conn):
        assert store.store(conn, "outcome", first, {}) == "created"
        assert store.store(conn, "outcome", first, {}) == "duplicate"
        changed = {**first, "outcome": "died", "payload_hash": "other"}
        assert store.store(conn, "outcome", changed, {"outcome": "died"}) == "conflict"
    assert conn.execute("SELECT outcome FROM cases").fetchone()[0] == "referred"
    assert len(store.conflicts(conn, "outcome", "o1")) == 1


def test_an_outcome_with_a_follow_up_date_books_one_visit(app, users, conn):
    case_id = seed_case(app, users["chw"])
    row = outcome_row(case_id, "o1", "recovered_home", "2026-03-02T10:00:00Z",
                      followup_date="2026-03-04", followup_reason="dysentery")
    with write(conn):
        store.store(conn, "outcome", row, {})
        store.store(conn, "outcome", row, {})
    visits = store.visits_for(conn, case_id)
    assert [(v["due_date"], v["reason"], v["status"]) for v in visits] == [
        ("2026-03-04", "dysentery", "due")]
    chw = conn.execute("SELECT * FROM users WHERE id = ?", (users["chw"],)).fetchone()
    chw2 = conn.execute("SELECT * FROM users WHERE id = ?", (users["chw2"],)).fetchone()
    assert len(store.due_visits(conn, chw, up_to="2026-03-04")) == 1
    assert store.due_visits(conn, chw, up_to="2026-03-03") == []
    assert store.due_visits(conn, chw2, up_to="2026-03-04") == []


def test_the_household_search_treats_wildcards_as_text(app, users, conn):
    seed_case(app, users["chw"], household_ref="MB_1")
    seed_case(app, users["chw"], household_ref="MBX1")
    nurse = conn.execute("SELECT * FROM users WHERE id = ?", (users["nurse"],)).fetchone()
    found = store.list_cases(conn, nurse, household_ref="MB_")
    assert [r["household_ref"] for r in found] == ["MB_1"]
    assert len(store.list_cases(conn, nurse, household_ref="%")) == 0
