"""The caregiver sheet drawn on the phone from a case kept there (issue 5), in Chromium."""

from __future__ import annotations

import uuid

import pytest

from clinic_app.clinical.assess import assess
from clinic_app.clinical.types import ClinicSettings
from clinic_app.demo import STAFF

pytestmark = pytest.mark.browser

USERNAME, _ROLE, _NAME, _AREA, PASSWORD = STAFF[0]
# 16 kg, some dehydration: 75 ml/kg = 1200 ml over 4 hours (S04 IMCI Plan B).
CHILD = {"age_months": 40, "weight_kg": 16,
         "signs": {"condition": "restless", "eyes": "sunken", "drinking": "eager",
                   "skin_pinch": "slow"}}

QUEUE_CASE = """async (item) => {
  const { openOutbox } = await import('/static/js/outbox.js');
  const outbox = await openOutbox();
  await outbox.add(item);
}"""


def test_the_phone_draws_the_sheet_of_its_own_waiting_case_in_the_caregivers_language(
        live_server, page):
    missing = []
    page.on("response", lambda r: missing.append(r.url) if r.status == 404 else None)
    page.goto(live_server.url + "/login")
    page.fill("#username", USERNAME)
    page.fill("#password", PASSWORD)
    page.click("main button[type=submit]")
    page.wait_for_url(live_server.url + "/")
    case_id = str(uuid.uuid4())
    payload = {"id": case_id, "created_at": "2026-03-02T08:00:00Z", "input": CHILD,
               "result": assess(CHILD, ClinicSettings()), "caregiver_language": "sw"}
    page.goto(live_server.url + "/sheet/offline")
    page.evaluate(QUEUE_CASE, {"kind": "case", "id": case_id, "owner": USERNAME,
                               "payload": payload})
    page.goto(live_server.url + f"/sheet/offline#{case_id}")
    page.wait_for_selector("#sheet-root h1")
    text = page.inner_text("#sheet-root")
    assert "Kumtunza mtoto wako nyumbani" in text
    assert "mililita 1,200" in text
    assert page.eval_on_selector("html", "el => el.dir") == "ltr"
    page.select_option("#sheet-lang", "ar")
    page.wait_for_selector("html[dir=rtl]", state="attached")
    assert "رعاية طفلك في البيت" in page.inner_text("#sheet-root")
    assert missing == [] and page.console_errors == []


def test_a_case_not_on_the_phone_gets_a_plain_message(live_server, page):
    page.goto(live_server.url + "/login")
    page.fill("#username", USERNAME)
    page.fill("#password", PASSWORD)
    page.click("main button[type=submit]")
    page.wait_for_url(live_server.url + "/")
    page.goto(live_server.url + f"/sheet/offline#{uuid.uuid4()}")
    page.wait_for_selector("#sheet-status:not(:empty)")
    assert page.inner_text("#sheet-status") == "This case is not kept on this phone."
