"""Progressive enhancement: with JavaScript off the same form is assessed and saved by the
server, and the result card is the same partial the phone fills."""

from __future__ import annotations

import pytest

from clinic_app.demo import STAFF
from clinic_app.storage import cases, db
from tests.e2e.conftest import PHONE

pytestmark = pytest.mark.browser


def test_without_javascript_the_server_assesses_and_saves_the_case(live_server, browser):
    context = browser.new_context(**PHONE, java_script_enabled=False)
    page = context.new_page()
    try:
        username, _role, _name, _area, password = STAFF[0]
        page.goto(live_server.url + "/login")
        page.fill("#username", username)
        page.fill("#password", password)
        page.click("main button[type=submit]")
        page.goto(live_server.url + "/assess")
        page.fill("#age_value", "18")
        page.fill("#weight_kg", "10")
        for name, value in (("condition", "restless"), ("eyes", "sunken"),
                            ("drinking", "eager"), ("skin_pinch", "slow")):
            page.check(f"input[name={name}][value={value}]")
        page.click("#assess-button")
        card = page.locator("#result-area .result")
        assert card.get_attribute("data-severity") == "some"
        # S04 75 ml/kg x 10 kg; S03 WHO 2005 row 8 to <11 kg: 600-800 ml.
        assert "750 ml over 4 hours" in card.inner_text()
        page.fill("#save-ors_sachets", "2")
        page.click("#save-button")
        page.wait_for_url("**/assess/saved/**")
        case_id = page.url.rsplit("/", 1)[1]
    finally:
        context.close()
    conn = db.connect(str(live_server.workdir / "clinic.sqlite3"))
    try:
        assert cases.count(conn) == 1
        assert cases.get(conn, case_id)["plan"] == "B"
    finally:
        conn.close()
