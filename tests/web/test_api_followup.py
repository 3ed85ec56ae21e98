"""Phone sync of reassessments, monitoring entries and outcomes: exactly once, in scope."""

from __future__ import annotations

import uuid
from datetime import timedelta

import pytest

from clinic_app.storage import db

from .followup_helpers import NONE, START, Clock, seed_case


@pytest.fixture
def phone(client, as_user):
    """The CHW's registered phone: its sync headers."""
    csrf = as_user("chw")
    body = client.post("/api/v1/devices", json={"label": "phone"},
                       headers={"X-CSRFToken": csrf}).get_json()
    client.post("/api/v1/logout", headers={"X-CSRFToken": csrf})
    return {"Authorization": f"Bearer {body['token']}", "X-Clinic-Sync": "1"}


def reassessment(case_id, signs=NONE, **changes):
    return {"id": str(uuid.uuid4()), "case_id": case_id, "assessed_at": "2026-03-02T12:00:00Z",
            "input": {"age_months": 18, "weight_kg": 10, "signs": signs}, **changes}


def statuses(response):
    assert response.status_code == 200, response.get_json()
    return [r["status"] for r in response.get_json()["results"]]


def count(app, table):
    conn = db.connect(app.config["DATABASE"])
    try:
        return conn.execute(f"SELECT COUNT(*) FROM {table}").fetchone()[0]
    finally:
        conn.close()


def test_a_reassessment_is_stored_exactly_once(app, client, users, phone):
    case_id = seed_case(app, users["chw"])
    item = reassessment(case_id)
    send = lambda batch: client.post("/api/v1/reassessments",  # noqa: E731
                                     json={"reassessments": batch}, headers=phone)
    assert statuses(send([item])) == ["created"]
    assert statuses(send([item])) == ["duplicate"]
    changed = {**item, "assessed_at": "2026-03-02T12:05:00Z"}
    assert statuses(send([changed])) == ["conflict"]
    assert count(app, "reassessments") == 1
    assert count(app, "followup_conflicts") == 1
    conn = db.connect(app.config["DATABASE"])
    row = conn.execute("SELECT plan, transition FROM reassessments").fetchone()
    conn.close()
    assert tuple(row) == ("A", "B_to_A")


def test_sync_calls_need_the_phone_token(app, client, users):
    case_id = seed_case(app, users["chw"])
    response = client.post("/api/v1/reassessments",
                           json={"reassessments": [reassessment(case_id)]},
                           headers={"X-Clinic-Sync": "1"})
    assert response.status_code == 401
    assert response.get_json()["error"]["code"] == "token_required"


def test_another_chws_case_is_rejected_and_an_unknown_one_waits(app, client, users, phone):
    theirs = seed_case(app, users["chw2"])
    batch = [reassessment(theirs), reassessment(str(uuid.uuid4()))]
    response = client.post("/api/v1/reassessments", json={"reassessments": batch},
                           headers=phone)
    assert statuses(response) == ["rejected", "retry"]
    assert count(app, "reassessments") == 0


def test_monitoring_entries_and_an_outcome_sync_and_close_the_case(app, client, users, phone):
    case_id = seed_case(app, users["chw"], signs=NONE, blood_in_stool=True)
    entry = {"id": str(uuid.uuid4()), "case_id": case_id, "at": "2026-03-02T09:00:00.000Z",
             "what": "ors", "cups": 1.5}
    response = client.post("/api/v1/monitoring", json={"entries": [entry, entry]},
                           headers=phone)
    assert statuses(response) == ["created", "duplicate"]
    outcome = {"id": str(uuid.uuid4()), "case_id": case_id, "at": "2026-03-02T10:00:00Z",
               "outcome": "recovered_home"}
    assert statuses(client.post("/api/v1/outcomes", json={"outcomes": [outcome]},
                                headers=phone)) == ["created"]
    conn = db.connect(app.config["DATABASE"])
    assert conn.execute("SELECT outcome FROM cases").fetchone()[0] == "recovered_home"
    # S07: dysentery, follow up in 2 days.
    assert conn.execute("SELECT due_date FROM followup_visits").fetchone()[0] == "2026-03-04"
    conn.close()


@pytest.mark.parametrize("entry, message", [
    ({"what": "ors"}, "An intake needs ml or cups."),
    ({"what": "tea", "ml": 10}, "what must be one of"),
    ({"what": "ors", "ml": -1}, "ml must be a number from 0 to 5000."),
    ({"what": "stool", "at": "yesterday"}, "at must be an ISO 8601 date and time."),
])
def test_bad_monitoring_entries_are_rejected_with_a_reason(app, client, users, phone, entry,
                                                           message):
    case_id = seed_case(app, users["chw"])
    raw = {"id": str(uuid.uuid4()), "case_id": case_id, "at": "2026-03-02T09:00:00Z", **entry}
    result = client.post("/api/v1/monitoring", json={"entries": [raw]},
                         headers=phone).get_json()["results"][0]
    assert result["status"] == "rejected" and message in result["error"]


def test_the_due_list_for_reminders_moves_with_the_clock(app, client, users, as_user):
    # S02: Plan B, reassess after four hours.
    app.config["CLOCK"] = clock = Clock(START + timedelta(hours=3))
    seed_case(app, users["chw"])
    seed_case(app, users["chw2"])
    as_user("chw")
    body = client.get("/api/v1/due").get_json()
    assert [(i["kind"], i["due_at"]) for i in body["items"]] == [
        ("reassess", "2026-03-02T12:00:00Z")]
    clock.moment = START + timedelta(hours=4)
    assert client.get("/api/v1/due").get_json()["items"][0]["late"] is False
