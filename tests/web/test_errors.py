"""Error pages are friendly and translated; API errors are JSON; no stack trace ever shows."""

from __future__ import annotations

import pytest
from flask import Blueprint

from tests.conftest import login


def test_an_unknown_page_gets_a_friendly_404(client, users):
    login(client, "nurse")
    response = client.get("/no-such-page")
    assert response.status_code == 404
    assert b"Page not found" in response.data and b"<html" in response.data


def test_an_unknown_api_route_gets_the_json_error_shape(client):
    response = client.get("/api/v1/no-such-thing")
    assert response.status_code == 404
    assert response.get_json() == {"error": {"code": "not_found", "message": "Page not found",
                                             "fields": {}}}


@pytest.fixture
def crashing_app(app):
    bp = Blueprint("crash", __name__)

    @bp.get("/crash")
    def crash():
        raise RuntimeError("secret internals")

    @bp.get("/api/v1/crash")
    def api_crash():
        raise RuntimeError("secret internals")

    app.register_blueprint(bp)
    app.config["PROPAGATE_EXCEPTIONS"] = False
    return app


def test_a_server_error_never_shows_a_stack_trace(crashing_app, users):
    client = crashing_app.test_client()
    login(client, "nurse")
    page = client.get("/crash")
    assert page.status_code == 500
    assert b"Something went wrong" in page.data
    assert b"secret internals" not in page.data and b"Traceback" not in page.data
    api = client.get("/api/v1/crash")
    assert api.status_code == 500 and api.get_json()["error"]["code"] == "server_error"
    assert "secret internals" not in api.get_data(as_text=True)


def test_error_pages_are_translated_when_a_catalog_exists(client, users):
    login(client, "nurse")
    response = client.get("/no-such-page?lang=fr")
    assert response.status_code == 404
    assert 'lang="fr"' in response.get_data(as_text=True)
    assert "Page introuvable" in response.get_data(as_text=True)


def test_a_page_outside_the_users_role_gets_a_friendly_translated_403(client, users):
    login(client, "chw")
    response = client.get("/admin")
    assert response.status_code == 403
    html = response.get_data(as_text=True)
    assert "This page is not for your role" in html and "<html" in html
    assert "Traceback" not in html
    french = client.get("/admin?lang=fr").get_data(as_text=True)
    assert "<h1>Cette page n'est pas pour votre rôle</h1>" in french


def test_a_bad_request_gets_a_friendly_400_page_not_a_trace(client, users):
    response = client.post("/login", data={"username": "nurse", "password": "x"})
    assert response.status_code == 400
    html = response.get_data(as_text=True)
    assert "<html" in html and "Reload the page" in html and "Traceback" not in html


def test_every_html_response_carries_the_security_headers(client):
    response = client.get("/login")
    csp = response.headers["Content-Security-Policy"]
    assert "unsafe-inline" not in csp and "frame-ancestors 'none'" in csp
    assert response.headers["X-Content-Type-Options"] == "nosniff"
    assert response.headers["Referrer-Policy"] == "same-origin"
