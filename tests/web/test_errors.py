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
    assert b'lang="' in response.data


def test_every_html_response_carries_the_security_headers(client):
    response = client.get("/login")
    csp = response.headers["Content-Security-Policy"]
    assert "unsafe-inline" not in csp and "frame-ancestors 'none'" in csp
    assert response.headers["X-Content-Type-Options"] == "nosniff"
    assert response.headers["Referrer-Policy"] == "same-origin"
