"""A health worker logs in on a phone-sized screen with the printed demo login."""

from __future__ import annotations

import pytest

from clinic_app.demo import STAFF

pytestmark = pytest.mark.browser


def test_a_chw_logs_in_with_the_demo_login_and_sees_the_start_page(live_server, page):
    username, _role, name, _area, password = STAFF[0]
    page.goto(live_server.url + "/")
    assert page.url.endswith("/login")
    page.fill("#username", username)
    page.fill("#password", password)
    page.click("main button[type=submit]")
    page.wait_for_url(live_server.url + "/")
    assert name in page.inner_text("h1")
    assert page.evaluate("document.documentElement.lang") == "en"
    assert page.console_errors == []


def test_a_wrong_password_shows_a_clear_message(live_server, page):
    page.goto(live_server.url + "/login")
    page.fill("#username", STAFF[0][0])
    page.fill("#password", "not-the-password")
    page.click("main button[type=submit]")
    assert "Wrong user name or password" in page.inner_text("[role=alert]")
