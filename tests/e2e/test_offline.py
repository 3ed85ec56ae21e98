"""Issue 4 acceptance: a health worker leaves Wi-Fi range, assesses three children on the phone,
comes back, and every record reaches the clinic server exactly once.

Leaving range is simulated by stopping the server (set_offline does not cover the service
worker's fetches). Expected results come from the Python core and the server's own result
presenter, so this also checks that the phone draws exactly what the server would.
"""

from __future__ import annotations

import json
import time

import pytest

from clinic_app.clinical.assess import assess
from clinic_app.demo import STAFF
from clinic_app.storage import cases, db
from clinic_app.storage import settings as settings_store
from tests.e2e.conftest import CHROMIUM, CHROMIUM_ARGS, PHONE

pytestmark = pytest.mark.browser

USERNAME, _ROLE, _NAME, _AREA, PASSWORD = STAFF[0]

# Form values and the severity a WHO chart gives them (S02/S03 two-or-more-signs rule).
CHILDREN = [
    ("none", {"age_value": "18", "weight_kg": "10", "condition": "well", "eyes": "normal",
              "drinking": "normal", "skin_pinch": "quick", "diarrhoea_days": "2"}),
    ("some", {"age_value": "18", "weight_kg": "10", "condition": "restless", "eyes": "sunken",
              "drinking": "eager", "skin_pinch": "slow", "diarrhoea_days": "2"}),
    ("severe", {"age_value": "3", "age_unit": "years", "weight_kg": "13",
                "condition": "lethargic", "eyes": "sunken", "drinking": "poor",
                "skin_pinch": "very_slow", "diarrhoea_days": "1"}),
]

READ_OUTBOX = """() => new Promise((resolve, reject) => {
  const open = indexedDB.open("clinic-outbox");
  open.onerror = () => reject(open.error);
  open.onsuccess = () => {
    const tx = open.result.transaction(["items", "devices"], "readonly");
    const items = tx.objectStore("items").getAll();
    const devices = tx.objectStore("devices").getAll();
    tx.oncomplete = () => resolve({items: items.result, devices: devices.result});
  };
})"""


@pytest.fixture
def phone(browser, tmp_path):
    """A phone-sized page in a persistent profile: Chromium reports every incognito context
    (Playwright's default) as not installable, and a phone's browser is not incognito."""
    context = browser.browser_type.launch_persistent_context(
        str(tmp_path / "profile"), executable_path=CHROMIUM, headless=True, args=CHROMIUM_ARGS,
        **PHONE)
    page = context.pages[0] if context.pages else context.new_page()
    errors: list[str] = []
    page.on("console", lambda msg: errors.append(msg.text) if msg.type == "error" else None)
    page.on("pageerror", lambda exc: errors.append(str(exc)))
    page.console_errors = errors
    yield page
    context.close()


def poll(page, script, timeout=40.0, arg=None):
    """Evaluate a (possibly async) function until it returns true."""
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if page.evaluate(script, arg):
            return
        time.sleep(0.2)
    raise AssertionError(f"still false after {timeout} s: {script}")


def log_in(page, url):
    page.goto(url + "/login")
    page.fill("#username", USERNAME)
    page.fill("#password", PASSWORD)
    page.click("main button[type=submit]")
    page.wait_for_url(url + "/")


def wait_until_ready_offline(page):
    page.wait_for_selector("#assess-form[data-ready=offline]", state="attached", timeout=40000)


def fill_child(page, values):
    if "age_unit" in values:
        page.select_option("#age_unit", values["age_unit"])
    for name in ("age_value", "weight_kg", "diarrhoea_days"):
        page.fill(f"#{name}", values[name])
    for name in ("condition", "eyes", "drinking", "skin_pinch"):
        page.check(f"input[name={name}][value={values[name]}]")


def expected_view(live_server, values):
    from clinic_app import create_app
    from clinic_app.web.assess_view import build_input, present

    conn = db.connect(str(live_server.workdir / "clinic.sqlite3"))
    settings = settings_store.load(conn)
    conn.close()
    app = create_app({"DATABASE": str(live_server.workdir / "clinic.sqlite3"),
                      "SECRET_KEY": "x"})
    with app.test_request_context():
        inputs = build_input({"age_unit": "months", **values})
        return present(assess(inputs, settings), settings, inputs["age_months"])


def test_three_assessments_made_offline_reach_the_server_exactly_once(live_server, phone):
    page = phone
    url = live_server.url
    log_in(page, url)
    page.goto(url + "/assess")
    poll(page, "() => navigator.serviceWorker.controller !== null")
    poll(page, "() => caches.keys().then(k => k.some(n => n.startsWith('pages-')))")
    page.reload()
    wait_until_ready_offline(page)
    poll(page, "() => (" + READ_OUTBOX + ")().then(o => o.devices.length === 1)")


    live_server.stop()  # out of range
    page.reload()  # the page itself now comes from the service worker
    wait_until_ready_offline(page)
    for severity, values in CHILDREN:
        fill_child(page, values)
        page.click("#assess-button")
        page.wait_for_selector("#result-area .result")
        card = page.locator("#result-area .result")
        want = expected_view(live_server, values)
        assert want["severity"] == severity
        assert card.get_attribute("data-severity") == severity
        assert card.locator("[data-slot=severity_text]").inner_text() == want["severity_text"]
        assert card.locator("[data-slot=plan_text]").inner_text() == want["plan_text"]
        assert card.locator("[data-slot=actions] li").all_inner_texts() == want["actions"]
        assert card.locator("[data-slot=cautions] li").all_inner_texts() == want["cautions"]
        if want["ors_text"]:
            assert card.locator("[data-slot=ors_text]").inner_text() == want["ors_text"]
            rows = card.locator("[data-slot=schedule] tr").all_inner_texts()
            assert len(rows) == len(want["schedule"])
        page.fill("#save-ors_sachets", "2")
        page.click("#save-button")
        page.wait_for_selector("#saved-note", state="visible")
    poll(page, "() => document.querySelector('[data-outbox-count]').textContent"
               ".includes('3 waiting to send')", timeout=20)
    waiting = page.evaluate(READ_OUTBOX)
    assert len(waiting["items"]) == 3
    # The worker's own recent cases stay readable offline, after a reload too.
    page.reload()
    wait_until_ready_offline(page)
    page.wait_for_selector("#recent-list li")
    recent = page.locator("#recent-list li").all_inner_texts()
    assert len(recent) == 3
    assert {"No dehydration", "Some dehydration", "Severe dehydration"} == {
        text.split(" · ")[1] for text in recent}
    assert any("Plan B: ORS in the clinic" in text for text in recent)

    live_server.start()  # back in range
    page.click("[data-outbox-send]")
    poll(page, "() => document.querySelector('[data-outbox-count]').textContent"
               ".includes('Nothing')", timeout=40)
    conn = db.connect(str(live_server.workdir / "clinic.sqlite3"))
    try:
        assert cases.count(conn) == 3
        assert conn.execute("SELECT COUNT(*) FROM cases WHERE engine_mismatch = 1"
                            ).fetchone()[0] == 0
        assert sorted(r["severity"] for r in conn.execute("SELECT severity FROM cases")) == [
            "none", "severe", "some"]
    finally:
        conn.close()

    token = waiting["devices"][0]["token"]
    batch = [item["payload"] for item in waiting["items"]]
    statuses = page.evaluate("""([token, batch]) => fetch("/api/v1/cases", {method: "POST",
        headers: {"Content-Type": "application/json", "Authorization": "Bearer " + token,
                  "X-Clinic-Sync": "1"}, body: JSON.stringify({cases: batch})})
        .then(r => r.json()).then(b => b.results.map(x => x.status))""", [token, batch])
    assert statuses == ["duplicate"] * 3
    conn = db.connect(str(live_server.workdir / "clinic.sqlite3"))
    assert cases.count(conn) == 3
    conn.close()

    cached = page.evaluate("""() => caches.keys().then(names => Promise.all(names.map(
        n => caches.open(n).then(c => c.keys()).then(ks => ks.map(k => k.url))))).then(
        lists => lists.flat())""")
    assert any(url.endswith("/assess") for url in cached)
    assert not [url for url in cached if "/api/v1/cases" in url]  # patient data stays in IDB
    cdp = page.context.new_cdp_session(page)
    errors = cdp.send("Page.getInstallabilityErrors")
    assert errors["installabilityErrors"] == [], json.dumps(errors)
    assert page.console_errors == []
