"""The assessment screen without JavaScript: the server computes, shows and saves."""

from __future__ import annotations

import re

from clinic_app.storage import audit, cases, db

SOME = {"age_value": "18", "age_unit": "months", "weight_kg": "10", "condition": "restless",
        "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow", "diarrhoea_days": "2"}


def csrf_of(html: str) -> str:
    return re.search(r'name="csrf_token" type="hidden" value="([^"]+)"', html).group(1)


def page(client):
    response = client.get("/assess")
    assert response.status_code == 200
    return response.get_data(as_text=True)


def test_the_form_asks_danger_signs_first_and_the_four_signs_with_hints(client, as_user):
    as_user("chw")
    html = page(client)
    order = [html.index(s) for s in ("Danger signs", "Age", "Weight", "MUAC", "General condition",
                                     "Eyes", "Offer water", "Skin pinch", "Days of diarrhoea",
                                     "Blood in the stool")]
    assert order == sorted(order)
    assert html.count('class="hint"') >= 5
    assert "<template id=\"result-template\">" in html


def test_some_dehydration_shows_plan_b_with_the_hourly_schedule_in_cups_and_spoons(
        client, as_user):
    as_user("chw")
    token = csrf_of(page(client))
    response = client.post("/assess", data={**SOME, "csrf_token": token, "action": "assess"})
    assert response.status_code == 200
    html = response.get_data(as_text=True)
    assert 'data-severity="some"' in html and "Some dehydration" in html
    # S04: 75 ml/kg for 10 kg = 750 ml; S03 WHO 2005 table 600-800 ml for 8 to <11 kg.
    assert "750 ml over 4 hours" in html and "600-800 ml" in html
    # 750 ml / 4 hours rounded half-up to 5 ml = 190 ml per hour (common practice rounding);
    # cups of the default 200 ml to the nearest quarter: 1; teaspoons of 5 ml: 38.
    assert html.count("<td>190 ml</td>") == 4
    assert "cups: 1<" in html and "teaspoons: 38<" in html


def test_an_implausible_weight_asks_for_a_check_instead_of_a_volume(client, as_user):
    as_user("chw")
    token = csrf_of(page(client))
    response = client.post("/assess", data={**SOME, "age_value": "2", "age_unit": "years",
                                            "weight_kg": "120", "csrf_token": token})
    assert response.status_code == 422
    html = response.get_data(as_text=True)
    assert 'id="confirm-weight">' in html and "ml over 4 hours" not in html
    assert 'id="confirm-weight" hidden' in page(client)  # only asked after the check fails


def test_saving_without_javascript_stores_one_case_even_if_sent_twice(app, client, as_user):
    as_user("chw")
    token = csrf_of(page(client))
    html = client.post("/assess", data={**SOME, "csrf_token": token}).get_data(as_text=True)
    case_id = re.search(r'id="save-case_id" name="save-case_id" type="hidden" value="([^"]+)"',
                        html).group(1)
    form = {**SOME, "csrf_token": token, "save-csrf_token": token, "save-case_id": case_id,
            "save-ors_sachets": "2", "save-zinc_tablets": "10", "action": "save"}
    first = client.post("/assess", data=form)
    assert first.status_code == 302
    client.post("/assess", data=form)
    conn = db.connect(app.config["DATABASE"])
    assert cases.count(conn) == 1
    row = cases.get(conn, case_id)
    assert row["plan"] == "B" and row["device_id"] is None and row["ors_sachets"] == 2
    assert [e["action"] for e in audit.entries(conn)].count("case.create") == 1
