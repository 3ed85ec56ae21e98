"""The admin pages: role gate, settings (versioned, audited, rulebook version), users, phones,
certificate expiry warning and last backup time."""

import dataclasses
import datetime as dt
import re
import uuid

import pytest

from clinic_app import tls
from clinic_app.clinical.types import ClinicSettings
from clinic_app.storage import audit, db, devices, profile, settings
from clinic_app.storage.backup import maybe_daily_backup
from tests.conftest import PASSWORD, login

NOW = dt.datetime.now(dt.UTC)

ADMIN_PAGES = ["/admin", "/admin/settings", "/admin/users", "/admin/devices"]
ADMIN_POSTS = ["/admin/settings", "/admin/users", "/admin/users/1/disable",
               "/admin/users/1/enable", "/admin/users/1/reset-password",
               "/admin/devices/x/revoke"]


def _conn(app):
    return db.connect(app.config["DATABASE"])


def _actions(app):
    conn = _conn(app)
    try:
        return [row["action"] for row in audit.entries(conn)]
    finally:
        conn.close()


def _form(**changes):
    """A complete settings form: the defaults, with ``changes``."""
    data = {k: v for k, v in dataclasses.asdict(ClinicSettings()).items()}
    data.update(clinic_name="Lukanda Hills Health Post", stock_alert_weeks=4,
                default_languages="en")
    data.update(changes)
    form = {}
    for key, value in data.items():
        if value is True:
            form[key] = "y"
        elif value is False or value is None:
            continue  # an unticked box or an empty optional number is simply absent
        else:
            form[key] = str(value)
    return form


@pytest.fixture
def admin(client, users):
    return login(client, "admin")


@pytest.mark.parametrize("persona", ["chw", "nurse", "supervisor"])
def test_other_roles_get_403_on_every_admin_page_and_action(client, users, persona):
    csrf = login(client, persona)
    for path in ADMIN_PAGES:
        assert client.get(path).status_code == 403, path
    for path in ADMIN_POSTS:
        assert client.post(path, data={"csrf_token": csrf}).status_code == 403, path


def test_anonymous_visitors_are_sent_to_the_login_page(client):
    for path in ADMIN_PAGES:
        response = client.get(path)
        assert response.status_code == 302 and "/login" in response.headers["Location"]


def test_the_settings_page_has_every_field_of_the_issue(client, admin):
    page = client.get("/admin/settings").get_data(as_text=True)
    for name in ["clinic_name", "referral_facility_name", "referral_facility_phone",
                 "plan_b_table", "iv_available", "ng_trained", "minutes_to_iv_facility",
                 "cholera_outbreak", "cholera_in_area", "zinc_days_min", "zinc_days_max",
                 "dysentery_policy_text", "cup_ml", "stock_alert_weeks", "default_languages",
                 "maintenance_above_20kg_ml_per_kg", "zinc_max_age_months"]:
        assert f'name="{name}"' in page, name


def test_a_settings_change_is_versioned_audited_and_changes_the_rulebook(app, client, admin):
    before = client.get("/api/v1/rulebook").get_json()["version"]
    response = client.post("/admin/settings", data={
        **_form(iv_available=True, cholera_in_area=True, minutes_to_iv_facility=45,
                referral_facility_name="Siwelo District Hospital", cup_ml=250),
        "csrf_token": admin})
    assert response.status_code == 302
    conn = _conn(app)
    saved = settings.load(conn)
    conn.close()
    assert (saved.iv_available, saved.cholera_in_area, saved.minutes_to_iv_facility) == (
        True, True, 45)
    assert (saved.referral_facility_name, saved.cup_ml) == ("Siwelo District Hospital", 250)
    after = client.get("/api/v1/rulebook").get_json()
    assert after["version"] != before and after["settings"]["cup_ml"] == 250
    assert {"settings_change", "profile_change"} <= set(_actions(app))  # name changed too
    assert after["version"][:12] in client.get("/admin/settings").get_data(as_text=True)


def test_the_upper_age_for_zinc_is_set_here_and_empty_means_no_limit(app, client, admin):
    # Reference section 5: IMCI stops at 5 years (S04) by default; a clinic may choose.
    assert 'name="zinc_max_age_months" type="number" value="60"' in client.get(
        "/admin/settings").get_data(as_text=True)
    client.post("/admin/settings", data={**_form(zinc_max_age_months=180), "csrf_token": admin})
    conn = _conn(app)
    assert settings.load(conn).zinc_max_age_months == 180
    # A browser sends an emptied number field as an empty string.
    client.post("/admin/settings", data={**_form(), "zinc_max_age_months": "",
                                         "csrf_token": admin})
    assert settings.load(conn).zinc_max_age_months is None
    conn.close()
    rulebook = client.get("/api/v1/rulebook").get_json()
    assert rulebook["settings"]["zinc_max_age_months"] is None
    bad = client.post("/admin/settings", data={**_form(zinc_max_age_months=1),
                                                "csrf_token": admin})
    assert bad.status_code == 400


def test_a_profile_only_change_keeps_the_rulebook_version(app, client, admin):
    before = client.get("/api/v1/rulebook").get_json()["version"]
    client.post("/admin/settings", data={**_form(clinic_name="Kantolo Post",
                                                 stock_alert_weeks=3), "csrf_token": admin})
    assert client.get("/api/v1/rulebook").get_json()["version"] == before
    conn = _conn(app)
    assert profile.load(conn).clinic_name == "Kantolo Post"
    assert profile.load(conn).stock_alert_weeks == 3
    conn.close()
    assert _actions(app)[0] == "profile_change"


def test_saving_unchanged_settings_writes_no_version(app, client, admin):
    client.post("/admin/settings", data={**_form(), "csrf_token": admin})
    first = _actions(app)
    client.post("/admin/settings", data={**_form(), "csrf_token": admin})
    assert _actions(app) == first


def test_new_cases_record_the_rulebook_version_in_force(app, client, admin, users):
    client.post("/admin/settings", data={**_form(iv_available=True), "csrf_token": admin})
    version = client.get("/api/v1/rulebook").get_json()["version"]
    client.post("/api/v1/logout", headers={"X-CSRFToken": admin})
    csrf = login(client, "chw")
    token = client.post("/api/v1/devices", json={"label": "p"},
                        headers={"X-CSRFToken": csrf}).get_json()["token"]
    inputs = {"age_months": 18, "weight_kg": 10,
              "signs": {"condition": "restless", "eyes": "sunken", "drinking": "eager",
                        "skin_pinch": "slow"}}
    result = client.post("/api/v1/assess", json=inputs, headers={"X-CSRFToken": csrf})
    case = {"id": str(uuid.uuid4()), "created_at": "2026-12-01T08:00:00+02:00",
            "area": "Mbeza", "input": inputs, "result": result.get_json(),
            "given": {"ors_sachets": 2, "zinc_tablets": 10}, "referral_made": False,
            "caregiver_language": "en"}
    response = client.post("/api/v1/cases", json={"cases": [case]},
                           headers={"Authorization": f"Bearer {token}", "X-Clinic-Sync": "1"})
    assert response.status_code == 200, response.get_json()
    assert response.get_json()["results"][0]["status"] == "created"
    stored = client.get(f"/api/v1/cases/{case['id']}").get_json()
    assert stored["rulebook_version"] == version


def test_it_refuses_zinc_days_in_the_wrong_order_and_saves_nothing(app, client, admin):
    response = client.post("/admin/settings", data={
        **_form(zinc_days_min=14, zinc_days_max=10), "csrf_token": admin})
    assert response.status_code == 400
    assert "Must not be fewer" in response.get_data(as_text=True)
    assert "settings_change" not in _actions(app)


def test_a_settings_post_without_the_csrf_token_is_refused(app, client, admin):
    response = client.post("/admin/settings", data=_form(iv_available=True))
    assert response.status_code == 400
    assert "settings_change" not in _actions(app)


def _one_time_password(response):
    match = re.search(r'id="one-time-password">([a-z0-9-]+)<', response.get_data(as_text=True))
    assert match, response.get_data(as_text=True)
    return match.group(1)


def test_an_admin_creates_a_user_with_a_one_time_password(app, client, admin):
    response = client.post("/admin/users", data={
        "username": "halima", "display_name": "Halima Banda", "role": "chw", "area": "Siwelo",
        "csrf_token": admin})
    assert response.status_code == 200
    password = _one_time_password(response)
    assert len(password) == 14
    other = app.test_client()
    login(other, "halima", password)
    conn = _conn(app)
    row = conn.execute("SELECT * FROM users WHERE username = 'halima'").fetchone()
    conn.close()
    assert row["must_change_password"] == 1 and row["role"] == "chw"
    assert "user_create" in _actions(app)


def test_a_taken_user_name_is_refused(client, admin):
    response = client.post("/admin/users", data={"username": "nurse", "role": "nurse",
                                                  "csrf_token": admin})
    assert response.status_code == 400 and "already taken" in response.get_data(as_text=True)


def test_disabling_a_user_ends_their_sessions_and_revokes_their_phones(app, client, admin,
                                                                       users):
    chw = app.test_client()
    login(chw, "chw")
    conn = _conn(app)
    with db.write(conn):
        device_id, _token = devices.register(conn, users["chw"], label="phone", created_at="x")
    conn.close()
    assert chw.get("/api/v1/me").status_code == 200
    response = client.post(f"/admin/users/{users['chw']}/disable", data={"csrf_token": admin})
    assert response.status_code == 302
    assert chw.get("/api/v1/me").status_code == 401
    conn = _conn(app)
    assert conn.execute("SELECT revoked_at FROM devices WHERE id = ?",
                        (device_id,)).fetchone()[0]
    conn.close()
    bad = app.test_client().post("/api/v1/login", json={"username": "chw",
                                                        "password": PASSWORD})
    assert bad.status_code == 401
    assert "user_disable" in _actions(app)


def test_an_admin_cannot_disable_their_own_account(app, client, admin, users):
    client.post(f"/admin/users/{users['admin']}/disable", data={"csrf_token": admin})
    assert client.get("/api/v1/me").status_code == 200


def test_a_password_reset_gives_a_new_one_time_password(app, client, admin, users):
    response = client.post(f"/admin/users/{users['nurse']}/reset-password",
                           data={"csrf_token": admin})
    password = _one_time_password(response)
    other = app.test_client()
    assert other.post("/api/v1/login", json={"username": "nurse",
                                             "password": PASSWORD}).status_code == 401
    login(other, "nurse", password)
    assert "password_reset" in _actions(app)


def test_an_admin_sees_and_revokes_phones(app, client, admin, users):
    conn = _conn(app)
    with db.write(conn):
        device_id, _token = devices.register(conn, users["chw2"], label="Kantolo phone",
                                             created_at="2026-12-01T08:00:00Z")
    conn.close()
    page = client.get("/admin/devices").get_data(as_text=True)
    assert "Kantolo phone" in page and "chw2" in page
    response = client.post(f"/admin/devices/{device_id}/revoke", data={"csrf_token": admin})
    assert response.status_code == 302
    assert "revoked" in client.get("/admin/devices").get_data(as_text=True)
    assert client.post("/admin/devices/nope/revoke",
                       data={"csrf_token": admin}).status_code == 404
    assert "device_revoke" in _actions(app)


def test_the_overview_warns_60_days_before_the_certificate_expires(app, client, admin):
    # Issued so that 59 and a half days are left: inside the 60-day warning window of issue 8.
    issued = NOW - dt.timedelta(days=tls.SERVER_VALID_DAYS - 1 - 59.5)
    tls.init_ca_and_server(app.instance_path, ["127.0.0.1"], [], "Lukanda", issued)
    page = client.get("/admin").get_data(as_text=True)
    assert 'id="cert-warning"' in page and "59 days" in page


def test_the_overview_does_not_warn_for_a_fresh_certificate(app, client, admin):
    paths = tls.init_ca_and_server(app.instance_path, ["127.0.0.1"], [], "Lukanda", NOW)
    page = client.get("/admin").get_data(as_text=True)
    assert 'id="cert-warning"' not in page
    assert tls.ca_fingerprint_sha256(paths.ca_cert) in page


def test_the_overview_shows_the_last_backup_time(app, client, admin):
    assert "none yet" in client.get("/admin").get_data(as_text=True)
    taken = dt.datetime(2026, 12, 1, 22, 0, tzinfo=dt.UTC)
    maybe_daily_backup(app.config["DATABASE"], f"{app.instance_path}/backups", taken)
    page = client.get("/admin").get_data(as_text=True)
    assert 'id="last-backup">2026-12-01T22:00:00Z<' in page


def test_the_next_phone_sync_receives_the_new_rulebook_version(app, client, admin, users):
    before = client.get("/api/v1/rulebook").get_json()["version"]
    client.post("/admin/settings", data={**_form(ng_trained=True), "csrf_token": admin})
    after = client.get("/api/v1/rulebook").get_json()["version"]
    assert after != before
    client.post("/api/v1/logout", headers={"X-CSRFToken": admin})
    csrf = login(client, "chw")
    token = client.post("/api/v1/devices", json={"label": "p"},
                        headers={"X-CSRFToken": csrf}).get_json()["token"]
    response = client.post("/api/v1/cases", json={"cases": []},
                           headers={"Authorization": f"Bearer {token}", "X-Clinic-Sync": "1"})
    assert response.status_code == 200
    assert response.get_json()["rulebook_version"] == after
