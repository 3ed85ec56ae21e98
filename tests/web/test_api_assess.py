"""POST /api/v1/assess and GET /api/v1/rulebook over HTTP (the core itself is tested in
tests/clinical)."""

from __future__ import annotations

import pytest

from clinic_app.clinical.types import ClinicSettings
from clinic_app.storage import db
from clinic_app.storage import settings as settings_store

WELL = {"condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"}
SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
NO_DANGER = {"unable_to_drink_or_breastfeed": False, "vomits_everything": False,
             "convulsions": False, "shock": False}
OUTPUT_FIELDS = {"severity", "plan", "refer", "classifications", "ors", "per_stool_ml",
                 "home_ors_ml_per_day", "zinc", "iv", "ng", "sam_rehydration", "actions",
                 "cautions", "scores", "rulebook_version"}


def body(**overrides):
    return {"age_months": 18, "weight_kg": 10.0, "signs": SOME, "danger_signs": NO_DANGER,
            **overrides}


@pytest.fixture
def nurse(client, as_user):
    token = as_user("nurse")
    return lambda payload: client.post("/api/v1/assess", json=payload,
                                       headers={"X-CSRFToken": token})


def test_it_answers_every_contract_field(nurse):
    response = nurse(body())
    assert response.status_code == 200
    result = response.get_json()
    assert OUTPUT_FIELDS <= set(result)
    # S03/S04: some dehydration -> Plan B, 75 ml/kg when the weight is known (10 kg -> 750 ml)
    assert result["severity"] == "some" and result["plan"] == "B"
    assert result["ors"]["total_ml"] == 750 and result["ors"]["basis"] == "weight"
    assert all({"code", "text"} <= set(c) for c in result["cautions"])


def test_it_stores_nothing(app, nurse):
    nurse(body())
    conn = db.connect(app.config["DATABASE"])
    tables = [r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type='table'"
                                         " AND name LIKE 'case%'")]
    assert all(conn.execute(f"SELECT count(*) FROM {t}").fetchone()[0] == 0 for t in tables)


@pytest.mark.parametrize("field,value", [
    ("age_months", -1), ("age_months", 1440), ("age_months", "ten"), ("weight_kg", 0.4),
    ("weight_kg", 251), ("sex", "other"), ("height_cm", 44), ("muac_mm", 11.5),
    ("diarrhoea_days", -2), ("blood_in_stool", "yes"),
])
def test_it_answers_422_with_a_message_for_the_bad_field(nurse, field, value):
    response = nurse(body(**{field: value}))
    assert response.status_code == 422
    error = response.get_json()["error"]
    assert error["code"] == "invalid_input"
    assert field in error["fields"] and error["fields"][field]
    assert error["message"]


def test_a_bad_sign_value_names_the_sign(nurse):
    response = nurse(body(signs={**SOME, "eyes": "closed"}))
    assert response.status_code == 422
    assert any("eyes" in key for key in response.get_json()["error"]["fields"])


def test_an_implausible_weight_is_refused_until_confirmed(nurse):
    # WHO weight-for-age z > +5 (WHO-MGRS-2006 flag rule): 120 kg at 24 months
    refused = nurse(body(age_months=24, weight_kg=120))
    assert refused.status_code == 422
    assert refused.get_json()["error"]["code"] == "implausible_weight"
    confirmed = nurse(body(age_months=24, weight_kg=120, confirm_implausible_weight=True))
    assert confirmed.status_code == 200


def test_anonymous_callers_get_401(client):
    response = client.post("/api/v1/assess", json=body())
    assert response.status_code == 401
    assert response.get_json()["error"]["code"] == "login_required"


def test_every_role_may_assess(client, as_user):
    for persona in ("chw", "nurse", "supervisor", "admin"):
        token = as_user(persona)
        assert client.post("/api/v1/assess", json=body(signs=WELL),
                           headers={"X-CSRFToken": token}).status_code == 200


def test_the_rulebook_version_follows_the_clinic_settings(app, client, as_user):
    as_user("nurse")
    first = client.get("/api/v1/rulebook").get_json()
    assert first["version"] and "rules" in first and "sources" in first
    conn = db.connect(app.config["DATABASE"])
    with db.write(conn):
        settings_store.save(conn, ClinicSettings(iv_available=True), user_id=None,
                            at="2026-12-02T10:00:00Z")
    second = client.get("/api/v1/rulebook").get_json()
    assert second["version"] != first["version"]
    assert second["settings"]["iv_available"] is True


def test_export_rules_writes_the_same_rulebook(runner, tmp_path, client, as_user):
    path = tmp_path / "rules.json"
    result = runner.invoke(args=["export-rules", str(path)])
    assert result.exit_code == 0, result.output
    import json

    as_user("nurse")
    assert json.loads(path.read_text())["version"] == client.get("/api/v1/rulebook"
                                                                 ).get_json()["version"]
