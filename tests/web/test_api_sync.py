"""The phone sync API: device tokens, the exactly-once case upload, and scoped reading."""

from __future__ import annotations

import copy
import uuid

import pytest

from clinic_app.clinical.assess import assess
from clinic_app.clinical.types import AssessmentInputError, ClinicSettings
from clinic_app.storage import audit, cases, db
from clinic_app.storage import users as user_store

SOME_SIGNS = {"condition": "restless", "eyes": "sunken", "drinking": "eager",
              "skin_pinch": "slow"}


def make_case(**changes) -> dict:
    """A well-formed case whose phone result equals the server's (default settings)."""
    inputs = changes.pop("input", {"age_months": 18, "weight_kg": 10, "signs": SOME_SIGNS})
    try:
        result = assess(inputs, ClinicSettings())
    except AssessmentInputError:
        result = {"severity": "some"}  # a phone that let bad input through
    case = {"id": str(uuid.uuid4()), "created_at": "2026-11-30T08:15:00+02:00",
            "area": "Mbeza", "input": inputs, "result": result,
            "given": {"ors_sachets": 2, "zinc_tablets": 10}, "referral_made": False,
            "caregiver_language": "en", "household_ref": "MB-014"}
    case.update(changes)
    return case


@pytest.fixture
def device(client, as_user):
    """Register a phone for the CHW; return its sync headers."""
    csrf = as_user("chw")
    response = client.post("/api/v1/devices", json={"label": "test phone"},
                           headers={"X-CSRFToken": csrf})
    assert response.status_code == 201
    body = response.get_json()
    assert set(body) == {"device_id", "token"}
    client.post("/api/v1/logout", headers={"X-CSRFToken": csrf})
    return {"Authorization": f"Bearer {body['token']}", "X-Clinic-Sync": "1"}


def send(client, headers, batch):
    return client.post("/api/v1/cases", json={"cases": batch}, headers=headers)


def statuses(response) -> list[str]:
    assert response.status_code == 200, response.get_json()
    return [r["status"] for r in response.get_json()["results"]]


def db_conn(app):
    return db.connect(app.config["DATABASE"])


def test_registering_a_device_needs_the_csrf_header(client, as_user):
    as_user("chw")
    assert client.post("/api/v1/devices", json={}).status_code == 400


def test_the_device_token_is_stored_only_as_a_hash(app, client, as_user):
    csrf = as_user("chw")
    body = client.post("/api/v1/devices", json={}, headers={"X-CSRFToken": csrf}).get_json()
    assert len(body["token"]) >= 32
    conn = db_conn(app)
    rows = [tuple(row) for row in conn.execute("SELECT * FROM devices")]
    assert len(rows) == 1
    assert not any(body["token"] in str(value) for value in rows[0])
    dump = "\n".join(conn.iterdump())
    assert body["token"] not in dump and body["device_id"] in dump
    # Shown once: reading the user's own data never gives it back.
    assert body["token"] not in client.get("/api/v1/me").get_data(as_text=True)


def test_registering_a_device_needs_a_login(client, users):
    response = client.post("/api/v1/devices", json={})
    assert response.status_code == 401
    assert response.get_json()["error"]["code"] == "login_required"


def test_a_new_case_is_created_then_a_resend_is_a_duplicate(app, client, device):
    case = make_case()
    assert statuses(send(client, device, [case])) == ["created"]
    assert statuses(send(client, device, [case])) == ["duplicate"]
    conn = db_conn(app)
    assert cases.count(conn) == 1
    row = cases.get(conn, case["id"])
    assert row["severity"] == "some" and row["plan"] == "B" and row["engine_mismatch"] == 0
    assert row["rulebook_version"] == case["result"]["rulebook_version"]
    assert row["received_at"] and row["status"] == "active"
    assert row["ors_sachets"] == 2 and row["zinc_tablets"] == 10
    actions = [e["action"] for e in audit.entries(conn)]
    assert actions.count("case.create") == 1


def test_the_same_id_with_a_different_payload_is_a_conflict_kept_apart(app, client, device):
    case = make_case()
    send(client, device, [case])
    changed = copy.deepcopy(case)
    changed["note"] = "edited later"
    assert statuses(send(client, device, [changed])) == ["conflict"]
    assert statuses(send(client, device, [changed])) == ["conflict"]
    conn = db_conn(app)
    assert cases.get(conn, case["id"])["note"] is None  # never overwritten
    assert len(cases.conflicts_for(conn, case["id"])) == 1


def test_a_kept_conflict_is_shown_beside_the_unchanged_case_for_review(
        client, device, as_user):
    case = make_case()
    send(client, device, [case])
    assert client.get(f"/api/v1/cases/{case['id']}").status_code == 401
    as_user("nurse")
    assert client.get(f"/api/v1/cases/{case['id']}").get_json()["conflicts"] == []
    changed = {**copy.deepcopy(case), "note": "edited later"}
    assert statuses(send(client, device, [changed])) == ["conflict"]
    body = client.get(f"/api/v1/cases/{case['id']}").get_json()
    assert body["note"] is None
    [kept] = body["conflicts"]
    assert kept["payload"]["note"] == "edited later" and kept["received_at"]
    assert kept["resolved_at"] is None


@pytest.mark.parametrize("change, field", [
    ({"id": "not-a-uuid"}, "id"),
    ({"created_at": "yesterday"}, "created_at"),
    ({"input": {"age_months": 18}}, "signs"),
    ({"given": {"ors_sachets": -1}}, "ors_sachets"),
    ({"referral_made": "yes"}, "referral_made"),
    ({"note": "x" * 5000}, "note"),
])
def test_a_bad_case_is_rejected_with_a_reason_and_the_rest_still_stored(
        app, client, device, change, field):
    good, bad = make_case(), make_case(**change)
    response = send(client, device, [bad, good])
    assert statuses(response) == ["rejected", "created"]
    assert field in response.get_json()["results"][0]["error"]
    assert cases.count(db_conn(app)) == 1


def test_an_input_the_server_finds_implausible_is_rejected(client, device):
    # A 120 kg two-year-old never gives a volume silently (issue 3).
    case = make_case(input={"age_months": 24, "weight_kg": 120, "signs": SOME_SIGNS})
    assert statuses(send(client, device, [case])) == ["rejected"]


def test_it_accepts_500_cases_and_refuses_501(app, client, device):
    template = make_case()
    batch = [{**template, "id": str(uuid.uuid4())} for _ in range(501)]
    response = send(client, device, batch)
    assert response.status_code == 413
    assert response.get_json()["error"]["code"] == "batch_too_large"
    assert statuses(send(client, device, batch[:500])) == ["created"] * 500
    assert cases.count(db_conn(app)) == 500


def test_a_result_that_differs_from_the_servers_is_flagged_as_engine_mismatch(
        app, client, device):
    case = make_case()
    case["result"] = {**case["result"], "plan": "A"}
    assert statuses(send(client, device, [case])) == ["created"]
    row = cases.get(db_conn(app), case["id"])
    assert row["engine_mismatch"] == 1
    assert row["plan"] == "B"  # the tallies use the server's own result


def test_cases_from_a_disabled_user_are_quarantined_not_merged(app, client, device, users):
    conn = db_conn(app)
    with db.write(conn):
        user_store.set_active(conn, user_store.by_username(conn, "chw")["id"], False,
                              "2026-12-01T00:00:00Z")
    case = make_case()
    assert statuses(send(client, device, [case])) == ["created"]
    assert cases.get(conn, case["id"])["status"] == "quarantined"


@pytest.mark.parametrize("drop, status, code", [
    ("Authorization", 401, "token_required"),
    ("X-Clinic-Sync", 403, "sync_header_required"),
])
def test_it_refuses_a_sync_call_without_its_headers(client, device, drop, status, code):
    headers = {k: v for k, v in device.items() if k != drop}
    response = send(client, headers, [make_case()])
    assert response.status_code == status
    assert response.get_json()["error"]["code"] == code


def test_it_refuses_an_unknown_token(client, device):
    response = send(client, {**device, "Authorization": "Bearer nope"}, [make_case()])
    assert response.status_code == 401
    assert response.get_json()["error"]["code"] == "bad_token"


def test_it_refuses_a_revoked_device(app, client, device):
    from clinic_app.storage import devices
    conn = db_conn(app)
    with db.write(conn):
        for row in devices.all_devices(conn):
            devices.revoke(conn, row["id"], "2026-12-01T00:00:00Z")
    assert send(client, device, [make_case()]).status_code == 401


def test_it_refuses_a_form_post_instead_of_json(client, device):
    response = client.post("/api/v1/cases", data={"cases": "[]"}, headers=device)
    assert response.status_code == 403
    assert response.get_json()["error"]["code"] == "json_required"


def test_it_refuses_another_origin_and_accepts_its_own(client, device):
    foreign = send(client, {**device, "Origin": "http://evil.example"}, [make_case()])
    assert foreign.status_code == 403
    assert foreign.get_json()["error"]["code"] == "bad_origin"
    own = send(client, {**device, "Origin": "http://localhost"}, [make_case()])
    assert statuses(own) == ["created"]


def test_a_chw_gets_404_for_another_chws_case_and_a_nurse_can_read_it(
        app, client, device, as_user):
    case = make_case()
    send(client, device, [case])
    as_user("chw2")
    assert client.get(f"/api/v1/cases/{case['id']}").status_code == 404
    as_user("nurse")
    response = client.get(f"/api/v1/cases/{case['id']}")
    assert response.status_code == 200
    assert response.get_json()["server_result"]["plan"] == "B"
    as_user("chw")
    assert client.get(f"/api/v1/cases/{case['id']}").get_json()["id"] == case["id"]
    views = [e for e in audit.entries(db_conn(app)) if e["action"] == "case.view"]
    assert len(views) == 2


def test_reading_a_case_needs_a_login(client, users):
    assert client.get(f"/api/v1/cases/{uuid.uuid4()}").status_code == 401
