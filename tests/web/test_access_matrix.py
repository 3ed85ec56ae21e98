"""Every route × every role (and anonymous), from the app's URL map, against access_rules.py.

Also: CSRF on every state-changing route, security headers on every HTML response, disabling a
user, revoked phones, login throttling and the row-level scope of case reading.
"""

from __future__ import annotations

import re
import uuid

import pytest

from clinic_app.storage import db, devices
from tests.conftest import PASSWORD, login
from tests.web.access_rules import ROLES, RULES

STATE_CHANGING = {"POST", "PUT", "PATCH", "DELETE"}
SAMPLE_BY_NAME = {"case_id": "00000000-0000-4000-8000-000000000000"}
SAMPLE_BY_CONVERTER = {"int": "1", "uuid": "00000000-0000-4000-8000-000000000000",
                       "float": "1.0", "path": "x", "string": "x"}
_ARG = re.compile(r"<(?:(\w+)(?:\([^)]*\))?:)?(\w+)>")


def sample_url(rule: str) -> str:
    """The rule with every variable filled with a harmless sample value."""
    return _ARG.sub(lambda m: SAMPLE_BY_NAME.get(m.group(2))
                    or SAMPLE_BY_CONVERTER.get(m.group(1) or "string", "x"), rule)


def routes(app) -> list[tuple[str, str, str]]:
    """(endpoint, method, url) for every rule and method of the app."""
    out = []
    for rule in app.url_map.iter_rules():
        for method in sorted(rule.methods - {"HEAD", "OPTIONS"}):
            out.append((rule.endpoint, method, sample_url(rule.rule)))
    return sorted(out)


def request(client, method: str, url: str, csrf: str | None = None):
    headers = {"X-CSRFToken": csrf} if csrf else {}
    body = {"json": {}} if method in STATE_CHANGING else {}
    return client.open(url, method=method, headers=headers, **body)


def roles_for(rule, method: str) -> tuple[str, ...]:
    if method in STATE_CHANGING and rule.write_roles is not None:
        return rule.write_roles
    return rule.roles


def sent_to_login(response) -> bool:
    return response.status_code in (302, 303) and response.headers.get(
        "Location", "").split("?")[0].endswith("/login")


def header_problems(response) -> list[str]:
    """What is missing from the security headers of an HTML response."""
    csp = response.headers.get("Content-Security-Policy", "")
    directives = {part.split()[0]: part.split()[1:] for part in csp.split(";") if part.split()}
    problems = []
    if not csp:
        problems.append("no Content-Security-Policy")
    if "'unsafe-inline'" in csp or "'unsafe-eval'" in csp:
        problems.append("CSP allows unsafe-inline or unsafe-eval")
    if directives.get("frame-ancestors") != ["'none'"]:
        problems.append("CSP lacks frame-ancestors 'none'")
    if "script-src" not in directives and "default-src" not in directives:
        problems.append("CSP does not restrict scripts")
    if response.headers.get("X-Content-Type-Options") != "nosniff":
        problems.append("no X-Content-Type-Options: nosniff")
    if response.headers.get("Referrer-Policy") not in ("no-referrer", "same-origin",
                                                      "strict-origin",
                                                      "strict-origin-when-cross-origin"):
        problems.append("no strict Referrer-Policy")
    return problems


def test_every_endpoint_has_an_access_rule(app):
    endpoints = {rule.endpoint for rule in app.url_map.iter_rules()}
    missing = sorted(endpoints - set(RULES))
    assert not missing, ("New endpoints without an access rule: add them to "
                         f"tests/web/access_rules.py: {', '.join(missing)}")


def test_no_access_rule_names_an_endpoint_that_does_not_exist(app):
    endpoints = {rule.endpoint for rule in app.url_map.iter_rules()}
    assert sorted(set(RULES) - endpoints) == []


@pytest.mark.parametrize("who", ["anonymous", *ROLES])
def test_each_route_answers_each_role_as_the_table_says(app, users, who):
    failures = []
    for endpoint, method, url in routes(app):
        rule = RULES.get(endpoint)
        if rule is None:
            continue  # reported by test_every_endpoint_has_an_access_rule
        client = app.test_client()
        csrf = None if who == "anonymous" else login(client, who)
        response = request(client, method, url, csrf)
        status = response.status_code
        where = f"{method} {url} ({endpoint}) as {who}: {status}"
        if status >= 500:
            failures.append(f"{where}: server error")
        elif rule.session_status is not None:
            if status != rule.session_status:
                failures.append(f"{where}, expected {rule.session_status}")
        elif who == "anonymous" and not rule.public:
            if url.startswith("/api/"):
                ok = status == 401 and response.get_json()["error"]["code"] == "login_required"
            else:
                ok = sent_to_login(response)
            if not ok:
                failures.append(f"{where}, expected 401 or a redirect to /login")
        elif who == "anonymous" or who in roles_for(rule, method):
            if status in (401, 403) or (sent_to_login(response)
                                        and not rule.ends_on_login_page):
                failures.append(f"{where}, expected to get past the door")
        elif status != 403:
            failures.append(f"{where}, expected 403 for this role")
        if response.mimetype == "text/html":
            failures += [f"{where}: {p}" for p in header_problems(response)]
        if b"Traceback" in response.data:
            failures.append(f"{where}: a traceback reached the user")
    assert failures == []


def _allowed_client(app, rule):
    client = app.test_client()
    login(client, roles_for(rule, "POST")[0])
    return client


def test_every_state_changing_route_refuses_a_request_without_its_csrf_token(app, users):
    checked, failures = [], []
    for endpoint, method, url in routes(app):
        rule = RULES.get(endpoint)
        if method not in STATE_CHANGING or rule is None or rule.csrf != "token":
            continue
        client = _allowed_client(app, rule)
        for body in ({"json": {}}, {"data": {"note": "x"}}):
            response = client.open(url, method=method, **body)
            checked.append(endpoint)
            if response.status_code != 400:
                failures.append(f"{method} {url}: {response.status_code} without a token")
            elif url.startswith("/api/") and response.get_json()["error"]["code"] != "csrf_failed":
                failures.append(f"{method} {url}: not refused as csrf_failed")
    assert failures == []
    assert "auth.login" in checked and "api.logout" in checked


def test_every_phone_upload_needs_a_device_token_and_the_sync_header_not_a_session(
        app, client, users):
    csrf = login(client, "chw")
    token = client.post("/api/v1/devices", json={}, headers={"X-CSRFToken": csrf}
                        ).get_json()["token"]
    device = {"Authorization": f"Bearer {token}", "X-Clinic-Sync": "1"}
    uploads = [url for endpoint, method, url in routes(app)
               if endpoint in RULES and RULES[endpoint].csrf == "device"]
    assert "/api/v1/cases" in uploads
    for url in uploads:
        # A logged-in session with its CSRF header is not enough: sync is by device token only.
        assert client.post(url, json={}, headers={"X-CSRFToken": csrf, "X-Clinic-Sync": "1"}
                           ).status_code == 401, url
        no_header = client.post(url, json={}, headers={"Authorization": device["Authorization"]})
        assert no_header.status_code == 403, url
        assert no_header.get_json()["error"]["code"] == "sync_header_required"
        foreign = client.post(url, json={}, headers={**device, "Origin": "http://evil.example"})
        assert foreign.status_code == 403, url
        assert client.post(url, data={"x": "[]"}, headers=device).status_code == 403, url
        revoked = client.post(url, json={}, headers={**device, "Authorization": "Bearer nope"})
        assert revoked.status_code == 401, url


def test_error_pages_and_the_login_page_carry_the_security_headers(client):
    for url in ("/login", "/no-such-page", "/api/v1/no-such-call"):
        response = client.get(url)
        assert header_problems(response) == [] if response.mimetype == "text/html" else True
        assert response.headers.get("X-Content-Type-Options") == "nosniff"
        assert "frame-ancestors 'none'" in response.headers.get("Content-Security-Policy", "")


def _db(app):
    return db.connect(app.config["DATABASE"])


def _register_device(client) -> dict:
    csrf = login(client, "chw")
    body = client.post("/api/v1/devices", json={"label": "phone"},
                       headers={"X-CSRFToken": csrf}).get_json()
    return {"Authorization": f"Bearer {body['token']}", "X-Clinic-Sync": "1",
            "device_id": body["device_id"]}


def _case() -> dict:
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import ClinicSettings

    inputs = {"age_months": 18, "weight_kg": 10,
              "signs": {"condition": "well", "eyes": "normal", "drinking": "normal",
                        "skin_pinch": "quick"}}
    return {"id": str(uuid.uuid4()), "created_at": "2026-12-01T08:00:00Z", "area": "Mbeza",
            "input": inputs, "result": assess(inputs, ClinicSettings()),
            "given": {"ors_sachets": 1, "zinc_tablets": 10}, "referral_made": False,
            "caregiver_language": "en"}


def test_disabling_a_user_revokes_their_sessions_and_quarantines_their_phone(app, users):
    laptop, phone_client = app.test_client(), app.test_client()
    login(laptop, "chw")
    device = _register_device(phone_client)
    headers = {k: v for k, v in device.items() if k != "device_id"}
    admin = app.test_client()
    admin_csrf = login(admin, "admin")
    assert admin.post(f"/admin/users/{users['chw']}/disable",
                      headers={"X-CSRFToken": admin_csrf}).status_code in (302, 303)
    conn = _db(app)
    assert laptop.get("/api/v1/me").status_code == 401
    assert phone_client.get("/api/v1/me").status_code == 401
    relogin = app.test_client().post("/api/v1/login",
                                     json={"username": "chw", "password": PASSWORD})
    assert relogin.status_code == 401
    row = conn.execute("SELECT revoked_at FROM devices WHERE id = ?",
                       (device["device_id"],)).fetchone()
    assert row["revoked_at"] is not None
    case = _case()
    response = phone_client.post("/api/v1/cases", json={"cases": [case]}, headers=headers)
    assert response.status_code == 200
    stored = conn.execute("SELECT status FROM cases WHERE id = ?", (case["id"],)).fetchone()
    assert stored["status"] == "quarantined"
    conn.close()
    # Enabling the account again does not bring the old phone back: it must register anew.
    assert admin.post(f"/admin/users/{users['chw']}/enable",
                      headers={"X-CSRFToken": admin_csrf}).status_code in (302, 303)
    again = phone_client.post("/api/v1/cases", json={"cases": [_case()]}, headers=headers)
    assert again.status_code == 401


def test_a_phone_revoked_on_its_own_is_refused(app, users):
    phone_client = app.test_client()
    device = _register_device(phone_client)
    conn = _db(app)
    with db.write(conn):
        devices.revoke(conn, device["device_id"], "2026-12-02T10:00:00Z")
    conn.close()
    headers = {k: v for k, v in device.items() if k != "device_id"}
    response = phone_client.post("/api/v1/cases", json={"cases": [_case()]}, headers=headers)
    assert response.status_code == 401
    assert response.get_json()["error"]["code"] == "bad_token"


def test_a_chw_cannot_read_another_chws_case_but_a_nurse_can(app, users):
    phone_client = app.test_client()
    device = _register_device(phone_client)
    headers = {k: v for k, v in device.items() if k != "device_id"}
    case = _case()
    assert phone_client.post("/api/v1/cases", json={"cases": [case]}, headers=headers
                             ).status_code == 200
    seen = {}
    for persona in ("chw", "chw2", "nurse", "supervisor", "admin"):
        client = app.test_client()
        login(client, persona)
        seen[persona] = client.get(f"/api/v1/cases/{case['id']}").status_code
    assert seen == {"chw": 200, "chw2": 404, "nurse": 200, "supervisor": 200, "admin": 200}


def test_the_login_form_is_throttled_too_and_says_so_without_a_traceback(app, users):
    app.config["WTF_CSRF_ENABLED"] = False
    client = app.test_client()
    codes = [client.post("/login", data={"username": "nurse", "password": f"wrong-{i}"}
                         ).status_code for i in range(10)]
    assert codes[:9] == [401] * 9 and codes[9] == 429
    right = client.post("/login", data={"username": "nurse", "password": PASSWORD})
    assert right.status_code == 429
    assert b"Too many failed attempts" in right.data and b"Traceback" not in right.data
    # Another account from the same address is not locked by one account's failures.
    assert client.post("/login", data={"username": "chw", "password": PASSWORD}
                       ).status_code == 302
