"""The caregiver sheet as HTML: content, languages, direction, scope, audit and escaping."""

from __future__ import annotations

import re
from html import unescape

import pytest

from clinic_app.storage import audit, db

from ..web.followup_helpers import seed_case
from .helpers import KEY_PHRASE, LANGUAGES, SCRIPT, TOTAL_1200, quick_sheet


@pytest.mark.parametrize("lang", LANGUAGES)
def test_the_quick_sheet_shows_the_childs_volumes_in_the_locales_number_format(client, as_user,
                                                                               lang):
    token = as_user("nurse")
    response = quick_sheet(client, token, lang)
    assert response.status_code == 200
    html = response.get_data(as_text=True)
    assert TOTAL_1200[lang] in html  # S04: 75 ml/kg x 16 kg = 1200 ml
    assert KEY_PHRASE[lang] in html
    assert f'<html lang="{lang}" dir="{"rtl" if lang == "ar" else "ltr"}">' in html
    if lang in SCRIPT:
        low, high = SCRIPT[lang]
        assert len([c for c in html if low <= c <= high]) > 200


def test_the_sheet_has_every_section_the_caregiver_needs(client, as_user):
    html = quick_sheet(client, as_user("nurse"), "en").get_data(as_text=True)
    for phrase in ("one sachet into 1 liter of clean water",  # S16
                   "Use it within 24 hours. Make it fresh each day.",  # S16, conflict C14
                   "Cup = 200 mL",  # the clinic's cup size (default setting)
                   "each hour about 300 mL",  # S04: 1200 ml over 4 hours
                   "100 mL – 200 mL",  # S03: 2 to <10 years, per loose stool
                   "Give up to 1,000 mL a day",  # S03
                   "One tablet once a day, for 10 to 14 days.",  # S10: 20 mg from 6 months
                   "Tick a box each day:", "Keep breastfeeding",
                   "Come back at once if the child:", "has blood in the stool",
                   "is not better in 3 days",  # S02
                   "Next visit",
                   "Local protocols and the health worker"):
        assert phrase in html, phrase
    # S10: at least 10 days (solid squares), up to 14 (dashed): one cell of six figure
    # widths per day, the squares being the background of each run.
    required = re.search(r'<span class="days">([^<]*)</span>', html).group(1)
    extra = re.search(r'<span class="days extra">([^<]*)</span>', html).group(1)
    cells = [c for c in unescape(required + extra).split("\u200b") if c]
    assert [c.replace("\u2007", "") for c in cells] == [str(d) for d in range(1, 15)]
    assert all(len(c) == 6 for c in cells)
    assert len([c for c in unescape(required).split("\u200b") if c]) == 10
    for sign in ("watery_stools", "vomiting", "thirsty", "not_drinking", "fever", "blood",
                 "not_better"):
        assert f'class="pic pic-sign_{sign}"' in html


def test_every_pictogram_class_draws_a_bundled_picture(app, client, as_user):
    """A list item's pictograms are backgrounds set by class in sheet.css: each class that the
    template or the offline renderer writes must name pictures that exist."""
    from pathlib import Path

    static = Path(app.static_folder)
    css = (static / "css" / "sheet.css").read_text(encoding="utf-8")
    html = quick_sheet(client, as_user("nurse"), "en").get_data(as_text=True)
    offline = (static / "js" / "sheet_offline.js").read_text(encoding="utf-8")
    used = set(re.findall(r'class="pic (pic-[a-z_-]+)"', html))
    assert len(used) == 4 + 7  # the four mixing steps and the seven danger signs
    assert "pic pic-${pics.join('-')}" in offline and "pic pic-sign_${sign}" in offline
    for name in used:
        rule = re.search(r"\." + re.escape(name) + r" \{ background-image: ([^;]+);", css)
        assert rule, f"sheet.css has no picture for .{name}"
        pictures = re.findall(r'url\("\.\./(icons/sheet/[a-z_]+\.svg)"\)', rule.group(1))
        assert len(pictures) == len(name.split("-")) - 1, name
        assert all((static / picture).is_file() for picture in pictures), pictures


def test_a_small_child_gets_spoons_and_half_a_zinc_tablet(client, as_user):
    child = {"age_months": 4, "weight_kg": 6, "signs": {"condition": "well", "eyes": "normal",
                                                         "drinking": "normal",
                                                         "skin_pinch": "quick"}}
    html = quick_sheet(client, as_user("nurse"), "en", child=child).get_data(as_text=True)
    # S03: under 2 years 50-100 ml per loose stool = 10 to 20 teaspoons of 5 ml (common practice)
    assert "10 to 20 teaspoons" in html
    assert "Teaspoon = 5 mL" in html
    assert "0.5 tablet once a day" in html  # S04: under 6 months, half a 20 mg tablet (S10)
    assert "tablet_half.svg" in html


def test_an_urgent_referral_is_said_in_words_and_a_symbol_not_colour_alone(client, as_user):
    child = {"age_months": 20, "weight_kg": 10,
             "signs": {"condition": "lethargic", "eyes": "sunken", "drinking": "unable",
                       "skin_pinch": "very_slow"}}
    html = quick_sheet(client, as_user("nurse"), "en", child=child).get_data(as_text=True)
    assert "Go to the hospital now." in html
    assert 'role="alert"' in html and 'alt="Warning"' in html


def test_bad_quick_sheet_input_is_a_clear_message_not_a_crash(client, as_user):
    response = quick_sheet(client, as_user("nurse"), "en", child={"age_months": "x"})
    assert response.status_code == 422
    assert "Some fields need correcting." in response.get_data(as_text=True)


def test_an_unknown_language_or_paper_size_is_refused(client, as_user):
    token = as_user("nurse")
    assert quick_sheet(client, token, "xx").status_code == 400
    assert quick_sheet(client, token, "en", size="a3").status_code == 400


def test_the_quick_sheet_needs_a_login(client):
    assert client.get("/sheet/quick").status_code == 302


def test_a_chw_sees_the_sheet_of_their_own_case_and_not_of_anothers(app, client, users, as_user):
    mine = seed_case(app, users["chw"])
    theirs = seed_case(app, users["chw2"])
    as_user("chw")
    assert client.get(f"/cases/{mine}/sheet?lang=sw").status_code == 200
    assert client.get(f"/cases/{theirs}/sheet").status_code == 404
    assert client.get(f"/cases/{theirs}/sheet.pdf").status_code == 404
    assert client.get("/cases/no-such-case/sheet").status_code == 404


def test_viewing_a_case_sheet_is_audited(app, client, users, as_user):
    case_id = seed_case(app, users["chw"])
    as_user("nurse")
    html = client.get(f"/cases/{case_id}/sheet?lang=ar&size=a5").get_data(as_text=True)
    assert 'dir="rtl"' in html and "size-a5" in html
    assert "draft translation, to be reviewed by a native-speaking health worker" in html
    conn = db.connect(app.config["DATABASE"])
    actions = [(r["action"], r["record_id"]) for r in audit.entries(conn)]
    conn.close()
    assert ("sheet_view", case_id) in actions


def test_clinic_texts_are_escaped_on_the_sheet(app, client, users, as_user):
    from dataclasses import replace

    from clinic_app.clinical.types import ClinicSettings
    from clinic_app.storage import settings as settings_store

    conn = db.connect(app.config["DATABASE"])
    with db.write(conn):
        settings_store.save(conn, replace(ClinicSettings(),
                                          referral_facility_name="<b>Mbeza</b> Hospital"),
                            user_id=None, at="2026-03-01T00:00:00Z")
    conn.close()
    html = quick_sheet(client, as_user("nurse"), "en").get_data(as_text=True)
    assert "&lt;b&gt;Mbeza&lt;/b&gt; Hospital" in html and "<b>Mbeza" not in html


def test_the_interface_language_is_kept_in_the_session_apart_from_the_sheets(client, as_user):
    token = as_user("nurse")
    client.post("/language", data={"lang": "fr", "next": "/sheet/quick", "csrf_token": token})
    page = client.get("/sheet/quick").get_data(as_text=True)
    assert "Fiche rapide pour la famille" in page
    sheet = quick_sheet(client, token, "sw").get_data(as_text=True)
    assert "Changanya ORS" in sheet


def test_every_page_offers_the_interface_language_with_the_draft_notice(client):
    page = client.get("/login").get_data(as_text=True)
    assert 'action="/language"' in page
    assert '<option value="sw" lang="sw">Kiswahili — ' in page
    assert "draft translation, to be reviewed by a native-speaking health worker" in page
    assert client.post("/language", data={"lang": "sw"}).status_code == 400  # no CSRF token
    token = re.search(r'name="csrf_token" value="([^"]+)"', page).group(1)
    response = client.post("/language", data={"lang": "sw", "next": "/login",
                                              "csrf_token": token})
    assert response.status_code == 302 and response.headers["Location"].endswith("/login")
    assert "Ingia" in client.get("/login").get_data(as_text=True)


def test_the_offline_sheet_page_carries_what_the_phone_needs_to_draw_it(client, as_user):
    as_user("chw")
    page = client.get("/sheet/offline").get_data(as_text=True)
    assert 'id="sheet-root" data-username="chw"' in page
    assert 'data-rulebook-url="/api/v1/rulebook"' in page
    assert "js/pages/sheet_offline.js" in page and "css/sheet.css" in page


def test_the_case_page_links_to_its_caregiver_sheet(app, client, users, as_user):
    case_id = seed_case(app, users["chw"])
    as_user("chw")
    page = client.get(f"/cases/{case_id}").get_data(as_text=True)
    assert f'href="/cases/{case_id}/sheet"' in page


def test_the_sheet_footer_gives_the_clinic_name_and_phone_the_admin_saved(app, client, as_user):
    from clinic_app.storage import profile

    conn = db.connect(app.config["DATABASE"])
    with db.write(conn):
        profile.save(conn, profile.ClinicProfile(clinic_name="Siwelo Post",
                                                 clinic_phone="+000 555 0101"),
                     user_id=None, at="2026-12-02T09:00:00Z")
    html = quick_sheet(client, as_user("nurse"), "en").get_data(as_text=True)
    assert "Siwelo Post" in html and "+000 555 0101" in html
