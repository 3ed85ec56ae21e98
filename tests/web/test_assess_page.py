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
    # Young infants (under 2 months, S04/S07): what "lethargic" means, and no thirst sign.
    assert "moves only when stimulated, or not at all" in html
    assert "Not asked under 2 months." in html
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


def save_settings(app, **changes):
    from clinic_app.clinical.types import ClinicSettings
    from clinic_app.storage import settings as settings_store

    conn = db.connect(app.config["DATABASE"])
    with db.write(conn):
        settings_store.save(conn, ClinicSettings(**changes), user_id=None, at="2026-12-01T08:00")
    conn.close()


def test_a_referral_names_the_clinics_facility_and_phone_beside_a_shape_not_colour_alone(
        app, client, as_user):
    save_settings(app, referral_facility_name="Siwelo District Hospital",
                  referral_facility_phone="0977 000 111")
    as_user("chw")
    token = csrf_of(page(client))
    # S04: a danger sign (convulsions) means refer urgently.
    html = client.post("/assess", data={**SOME, "convulsions": "y", "csrf_token": token}
                       ).get_data(as_text=True)
    assert "Refer urgently" in html
    assert "Siwelo District Hospital, phone 0977 000 111" in html
    # The severity is spelled out in words next to an icon with one shape per severity.
    card = html[html.index('data-slot="result"'):]
    assert 'data-severity="some"' in html and "Some dehydration" in card
    for shape in ("shape-none", "shape-some", "shape-severe"):
        assert f'class="shape {shape}"' in card


def test_no_referral_shows_no_facility(app, client, as_user):
    save_settings(app, referral_facility_name="Siwelo District Hospital",
                  referral_facility_phone="0977 000 111")
    as_user("chw")
    token = csrf_of(page(client))
    html = client.post("/assess", data={**SOME, "csrf_token": token}).get_data(as_text=True)
    assert "No referral needed" in html and "Siwelo" not in html


def test_zinc_for_a_fixed_number_of_days_reads_as_one_number(app, client, as_user):
    # S04 IMCI adaptation: 20 mg from 6 months, for 10 days (a clinic setting).
    save_settings(app, zinc_days_min=10, zinc_days_max=10)
    as_user("chw")
    token = csrf_of(page(client))
    html = client.post("/assess", data={**SOME, "csrf_token": token}).get_data(as_text=True)
    assert "Zinc: 20 mg once a day for 10 days" in html and "10-10" not in html


def test_zinc_over_a_range_of_days_shows_the_range(client, as_user):
    # S10: 20 mg a day from 6 months, for 10-14 days (the default setting).
    as_user("chw")
    token = csrf_of(page(client))
    html = client.post("/assess", data={**SOME, "csrf_token": token}).get_data(as_text=True)
    assert "Zinc: 20 mg once a day for 10-14 days" in html


def test_an_age_in_weeks_is_turned_into_months_for_the_young_infant_rules(client, as_user):
    as_user("chw")
    token = csrf_of(page(client))
    # 5 weeks is a young infant (under 2 months, S04): no thirst sign, no zinc, referred.
    form = {"age_value": "5", "age_unit": "weeks", "weight_kg": "4.2", "condition": "well",
            "eyes": "normal", "skin_pinch": "quick", "csrf_token": token}
    html = client.post("/assess", data=form).get_data(as_text=True)
    assert 'data-severity="none"' in html
    assert "Young infant (under 2 months)" in html
    assert '<p data-slot="zinc_text" hidden></p>' in html
