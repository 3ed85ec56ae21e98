"""Logging in and out, sessions that can be revoked, throttling, and the access gate."""

from __future__ import annotations

import re
from datetime import UTC, datetime, timedelta

import pytest

from clinic_app.storage import db, sessions
from clinic_app.storage import users as user_store
from tests.conftest import PASSWORD, login


def test_api_login_answers_user_and_csrf_token(client, users):
    response = client.post("/api/v1/login", json={"username": "nurse", "password": PASSWORD})
    assert response.status_code == 200
    body = response.get_json()
    assert body["user"] == {"username": "nurse", "role": "nurse", "display_name": "Nurse",
                            "area": ""}
    assert len(body["csrf_token"]) > 20
    cookie = response.headers["Set-Cookie"]
    assert "HttpOnly" in cookie and "SameSite=Strict" in cookie
    assert "Secure" not in cookie  # plain HTTP in tests; TLS turns it on


def test_it_rejects_a_wrong_password_with_401_in_the_json_error_shape(client, users):
    response = client.post("/api/v1/login", json={"username": "nurse", "password": "nope-nope"})
    assert response.status_code == 401
    assert response.get_json()["error"]["code"] == "bad_login"
    assert set(response.get_json()["error"]) == {"code", "message", "fields"}


def test_it_rejects_a_login_body_that_is_not_json(client, users):
    response = client.post("/api/v1/login", data="username=nurse")
    assert response.status_code == 400
    assert response.get_json()["error"]["code"] == "bad_json"


def test_ten_wrong_passwords_within_a_minute_get_429(client, users):
    statuses = [client.post("/api/v1/login", json={"username": "chw", "password": f"wrong-{i}"}
                            ).status_code for i in range(10)]
    assert statuses[:9] == [401] * 9
    assert statuses[9] == 429
    # Even the right password is refused while the account is throttled.
    right = client.post("/api/v1/login", json={"username": "chw", "password": PASSWORD})
    assert right.status_code == 429


def test_throttling_ends_when_the_minute_has_passed(app, client, users):
    start = datetime(2026, 12, 2, 9, 0, tzinfo=UTC)
    app.config["CLOCK"] = lambda: start
    for i in range(10):
        client.post("/api/v1/login", json={"username": "chw", "password": f"wrong-{i}"})
    app.config["CLOCK"] = lambda: start + timedelta(seconds=61)
    assert client.post("/api/v1/login", json={"username": "chw", "password": PASSWORD}
                       ).status_code == 200


def test_throttling_per_address_covers_many_accounts(app, client, users):
    app.config["LOGIN_MAX_FAILURES_PER_ADDRESS"] = 5
    codes = [client.post("/api/v1/login", json={"username": f"ghost{i}", "password": "x" * 9}
                         ).status_code for i in range(5)]
    assert codes[-1] == 429


def test_disabling_a_user_ends_all_their_sessions_at_once(app, users):
    first, second = app.test_client(), app.test_client()
    login(first, "chw")
    login(second, "chw")
    assert first.get("/api/v1/me").status_code == 200
    with app.app_context():
        conn = db.connect(app.config["DATABASE"])
        with db.write(conn):
            user_store.set_active(conn, user_store.by_username(conn, "chw")["id"], False, "2026-12-02T09:00:00Z")
        assert sessions.count_for_user(conn, user_store.by_username(conn, "chw")["id"]) == 0
    assert first.get("/api/v1/me").status_code == 401
    assert second.get("/api/v1/me").status_code == 401


def test_logout_ends_the_server_side_session(client, users):
    token = login(client, "nurse")
    assert client.post("/api/v1/logout", headers={"X-CSRFToken": token}).status_code == 200
    assert client.get("/api/v1/me").status_code == 401


def test_a_logged_in_json_post_without_csrf_header_is_refused(client, users):
    login(client, "nurse")
    response = client.post("/api/v1/logout")
    assert response.status_code == 400
    assert response.get_json()["error"]["code"] == "csrf_failed"


def test_the_login_form_logs_in_and_redirects_home(app, users):
    app.config["WTF_CSRF_ENABLED"] = False
    client = app.test_client()
    response = client.post("/login", data={"username": "grace-not-there", "password": "whatever1"})
    assert response.status_code == 401
    assert b"Wrong user name or password" in response.data
    response = client.post("/login", data={"username": "nurse", "password": PASSWORD})
    assert response.status_code == 302
    assert client.get("/").status_code == 200


def test_the_login_form_refuses_a_post_without_its_csrf_token(client, users):
    response = client.post("/login", data={"username": "nurse", "password": PASSWORD})
    assert response.status_code == 400
    assert b"Traceback" not in response.data


SAMPLE_ARGS = {"int": "1", "uuid": "00000000-0000-4000-8000-000000000000", "string": "x",
               "path": "x", "float": "1.0"}


def test_anonymous_pages_redirect_to_login_and_api_answers_401(app, client):
    public = {"auth.login", "auth.logout", "api.login", "api.ping", "static"}
    for rule in app.url_map.iter_rules():
        view = app.view_functions[rule.endpoint]
        if rule.endpoint in public or getattr(view, "is_public", False):
            continue
        method = "GET" if "GET" in rule.methods else sorted(rule.methods - {"HEAD", "OPTIONS"})[0]
        url = re.sub(r"<(?:(\w+)(?:\([^)]*\))?:)?\w+>",
                     lambda m: SAMPLE_ARGS.get(m.group(1) or "string", "x"), rule.rule)
        response = client.open(url, method=method)
        if rule.rule.startswith("/api/"):
            assert response.status_code == 401, url
            assert response.get_json()["error"]["code"] == "login_required"
        else:
            assert response.status_code == 302, url
            assert response.headers["Location"].endswith("/login"), url


def test_ping_is_public(client):
    response = client.get("/api/v1/ping")
    assert response.status_code == 200 and response.get_json()["ok"] is True


def test_login_mints_the_form_token_so_parallel_requests_share_it(app, users):
    # Requests a browser sends at once after login (precache, device registration) must not
    # each mint a token and overwrite one another's cookie.
    app.config["WTF_CSRF_ENABLED"] = False
    client = app.test_client()
    client.post("/login", data={"username": "nurse", "password": PASSWORD})
    with client.session_transaction() as session:
        assert session.get("csrf_token")


def test_after_login_the_form_returns_to_the_page_that_asked_for_it(app, users):
    app.config["WTF_CSRF_ENABLED"] = False
    client = app.test_client()
    assert client.get("/assess").headers["Location"].endswith("/login")
    response = client.post("/login", data={"username": "nurse", "password": PASSWORD})
    assert response.headers["Location"].rstrip("?") == "/assess"


def test_a_background_fetch_does_not_rewrite_the_session_cookie(client, users):
    # A service-worker precache started before login must not put an old cookie back.
    response = client.get("/assess", headers={"Sec-Fetch-Mode": "same-origin"})
    assert response.status_code == 302
    assert "Set-Cookie" not in response.headers


def test_a_logged_in_page_view_does_not_resend_the_session_cookie(client, users):
    login(client, "nurse")
    assert "Set-Cookie" not in client.get("/api/v1/me").headers


@pytest.mark.parametrize("target, local", [
    ("/cases", True), ("/sheet/x?lang=fr", True), ("", False), (None, False),
    ("https://elsewhere.example/", False), ("//elsewhere.example/", False),
    ("/\\elsewhere.example/", False), ("cases", False),
])
def test_only_paths_on_this_server_count_as_local(target, local):
    from clinic_app.web.auth import is_local_path

    assert is_local_path(target) is local


def test_the_language_chooser_never_sends_the_user_to_another_host(app, client):
    app.config["WTF_CSRF_ENABLED"] = False
    for target in ("//elsewhere.example/", "/\\elsewhere.example/", "https://elsewhere.example/"):
        response = client.post("/language", data={"lang": "fr", "next": target})
        assert response.status_code == 302
        assert response.headers["Location"] == "/", target
    kept = client.post("/language", data={"lang": "fr", "next": "/login"})
    assert kept.headers["Location"] == "/login"
