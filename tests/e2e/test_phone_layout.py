"""Issue 4: the assessment screen on a 360 px phone: no sideways scrolling, large touch
targets, and a result that shows its severity by a shape and words, not by colour alone."""

from __future__ import annotations

import pytest

from clinic_app.demo import STAFF
from tests.e2e.test_offline import log_in, poll, wait_until_ready_offline

pytestmark = pytest.mark.browser

USERNAME, _ROLE, _NAME, _AREA, PASSWORD = STAFF[0]
MIN_TARGET_PX = 44  # common practice, no source: the usual minimum touch target

VISIBLE_SHAPES = """() => [...document.querySelectorAll('#result-area .sev-icon .shape')]
  .filter((g) => getComputedStyle(g).display !== 'none').map((g) => g.getAttribute('class'))"""


def test_the_form_fits_the_phone_and_its_targets_are_large(live_server, page):
    log_in(page, live_server.url)
    page.goto(live_server.url + "/assess")
    wait_until_ready_offline(page)
    assert page.evaluate("() => document.documentElement.scrollWidth") <= 360
    targets = page.evaluate("""() => [...document.querySelectorAll(
        '#assess-form label.choice, #assess-form button, #assess-form input:not([type=checkbox])'
        + ':not([type=radio]):not([type=hidden]), #assess-form select')]
      .filter((el) => el.offsetParent !== null)
      .map((el) => [el.outerHTML.slice(0, 80), el.getBoundingClientRect().height])""")
    # 4 danger signs, 11 sign choices, the other checkboxes, fields and the button.
    assert len(targets) > 20
    assert [html for html, height in targets if height < MIN_TARGET_PX] == []


@pytest.mark.parametrize("signs, severity, words", [
    # S02/S03 WHO two-or-more-signs rule.
    (("well", "normal", "normal", "quick"), "none", "No dehydration"),
    (("restless", "sunken", "eager", "slow"), "some", "Some dehydration"),
    (("lethargic", "sunken", "poor", "very_slow"), "severe", "Severe dehydration"),
])
def test_the_result_shows_one_shape_and_words_for_each_severity(
        live_server, page, signs, severity, words):
    log_in(page, live_server.url)
    page.goto(live_server.url + "/assess")
    wait_until_ready_offline(page)
    page.fill("#age_value", "3")
    page.select_option("#age_unit", "years")
    page.check("#no_scale")
    for name, value in zip(("condition", "eyes", "drinking", "skin_pinch"), signs, strict=True):
        page.check(f"input[name={name}][value={value}]")
    page.click("#assess-button")
    card = page.locator("#result-area .result")
    card.wait_for()
    assert card.locator("[data-slot=severity_text]").inner_text() == words
    assert page.evaluate(VISIBLE_SHAPES) == [f"shape shape-{severity}"]
    assert page.evaluate("() => document.documentElement.scrollWidth") <= 360
    assert page.console_errors == []


def test_a_record_the_server_refuses_is_reported_not_silently_dropped(live_server, page):
    log_in(page, live_server.url)
    page.goto(live_server.url + "/assess")
    wait_until_ready_offline(page)
    poll(page, """() => import("/static/js/outbox.js").then((m) => m.openOutbox())
        .then((o) => o.device(document.body.dataset.user)).then(Boolean)""")
    # A case whose input the server's own validation refuses (no signs at all).
    page.evaluate("""() => import("/static/js/outbox.js").then((m) => m.openOutbox())
      .then((o) => { const id = crypto.randomUUID();
        return o.add({kind: "case", id, owner: document.body.dataset.user,
          payload: {id, created_at: new Date().toISOString(), area: "", input: {age_months: 12},
                    result: {}, given: {ors_sachets: 0, zinc_tablets: 0}, referral_made: false,
                    caregiver_language: ""}}); })""")
    page.click("[data-outbox-send]")
    poll(page, "() => document.querySelector('[data-outbox-state]').textContent"
               ".includes('1 not accepted by the clinic server')")
    assert "Nothing waiting" in page.inner_text("[data-outbox-count]")
    failed = page.evaluate("""() => import("/static/js/outbox.js").then((m) => m.openOutbox())
      .then((o) => o.failed())""")
    assert len(failed) == 1 and "signs" in failed[0]["error"]
