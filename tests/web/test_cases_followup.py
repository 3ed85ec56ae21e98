"""The cases pages: scope, due now, reassessment, monitoring, outcome and follow-up visits."""

from __future__ import annotations

import re
from datetime import timedelta

import pytest

from clinic_app.storage import audit, db

from .followup_helpers import NONE, START, Clock, seed_case


@pytest.fixture
def clock(app):
    app.config["CLOCK"] = clock = Clock()
    return clock


def csrf_of(html: str) -> str:
    return re.search(r'name="csrf_token"[^>]*value="([^"]+)"', html).group(1)


def form_token(client, url):
    page = client.get(url)
    assert page.status_code == 200
    return csrf_of(page.get_data(as_text=True))


def test_a_chw_requesting_another_chws_case_gets_404(app, client, users, as_user, clock):
    theirs = seed_case(app, users["chw2"])
    as_user("chw")
    for suffix in ("", "/reassess", "/monitor", "/outcome"):
        assert client.get(f"/cases/{theirs}{suffix}").status_code == 404


def test_the_list_shows_only_cases_in_scope(app, client, users, as_user, clock):
    seed_case(app, users["chw"], household_ref="MB-001")
    seed_case(app, users["chw2"], household_ref="KT-002", area="Kantolo")
    as_user("chw")
    page = client.get("/cases/").get_data(as_text=True)
    assert "MB-001" in page and "KT-002" not in page


def test_a_nurse_filters_by_village_and_searches_by_household(app, client, users, as_user,
                                                            clock):
    seed_case(app, users["chw"], household_ref="MB-001")
    seed_case(app, users["chw2"], household_ref="KT-002", area="Kantolo")
    as_user("nurse")
    page = client.get("/cases/?village=kantolo").get_data(as_text=True)
    assert "KT-002" in page and "MB-001" not in page
    page = client.get("/cases/?q=mb-0").get_data(as_text=True)
    assert "MB-001" in page and "KT-002" not in page
    page = client.get("/cases/?date_from=2026-03-03").get_data(as_text=True)
    assert "MB-001" not in page and "KT-002" not in page


def test_the_status_filter_separates_open_closed_and_each_outcome(app, client, users, as_user,
                                                                   clock):
    open_case = seed_case(app, users["chw"], household_ref="MB-OPEN")
    seed_case(app, users["chw"], household_ref="MB-SHUT", created_at="2026-03-03T09:00:00Z")
    as_user("chw")
    shut = next(r["id"] for r in _cases(app) if r["household_ref"] == "MB-SHUT")
    url = f"/cases/{shut}/outcome"
    assert client.post(url, data={"csrf_token": form_token(client, url),
                                  "outcome": "admitted"}).status_code == 302
    listed = {status: client.get(f"/cases/?status={status}").get_data(as_text=True)
              for status in ("", "open", "closed", "admitted", "died")}
    assert "MB-OPEN" in listed[""] and "MB-SHUT" in listed[""]
    assert "MB-OPEN" in listed["open"] and "MB-SHUT" not in listed["open"]
    assert "MB-SHUT" in listed["closed"] and "MB-OPEN" not in listed["closed"]
    assert "MB-SHUT" in listed["admitted"] and "MB-OPEN" not in listed["admitted"]
    assert "MB-SHUT" not in listed["died"] and "MB-OPEN" not in listed["died"]
    # The date range is inclusive at both ends, on the day the case was made.
    page = client.get("/cases/?date_from=2026-03-02&date_to=2026-03-02").get_data(as_text=True)
    assert "MB-OPEN" in page and "MB-SHUT" not in page
    assert open_case in client.get("/cases/?date_to=2026-03-02").get_data(as_text=True)


def _cases(app):
    conn = db.connect(app.config["DATABASE"])
    try:
        return conn.execute("SELECT id, household_ref FROM cases").fetchall()
    finally:
        conn.close()


def test_a_plan_b_case_falls_due_for_reassessment_at_4_hours(app, client, users, as_user,
                                                           clock):
    # S02: Plan B, reassess after four hours.
    seed_case(app, users["chw"], household_ref="MB-077")
    as_user("chw")
    clock.moment = START + timedelta(hours=3, minutes=59)
    page = client.get("/cases/due").get_data(as_text=True)
    assert "Nothing due now." in page
    clock.moment = START + timedelta(hours=4)
    page = client.get("/cases/due").get_data(as_text=True)
    assert "Reassessment" in page.split("Coming up")[0] and "MB-077" in page


def test_reassessing_plan_b_with_better_signs_moves_to_plan_a(app, client, users, as_user,
                                                             clock):
    case_id = seed_case(app, users["chw"])
    as_user("chw")
    clock.moment = START + timedelta(hours=4)
    token = form_token(client, f"/cases/{case_id}/reassess")
    response = client.post(f"/cases/{case_id}/reassess", data={
        "csrf_token": token, **NONE})
    assert response.status_code == 302
    page = client.get(f"/cases/{case_id}").get_data(as_text=True)
    latest = page.split('id="latest"')[1]
    assert "Plan A" in latest and "B to A" in latest
    # S03 WHO 2005 Plan A: under 2 years, 50-100 ml after each loose stool.
    assert "After each loose stool: 50-100 ml" in latest
    # The reassessment is done: nothing more is due for this case.
    assert "Reassessment" not in client.get("/cases/due").get_data(as_text=True).split(
        "Coming up")[0]


def test_the_monitoring_screen_shows_target_given_and_remaining(app, client, users, as_user,
                                                                 clock):
    # 10 kg, Plan B: 75 ml/kg = 750 ml (S04); one stool under 2 years +50-100 ml (S03):
    # target 800-850 ml; given 2 cups x 200 ml = 400 ml; remaining 400-450 ml.
    case_id = seed_case(app, users["chw"])
    as_user("chw")
    clock.moment = START + timedelta(hours=1)
    url = f"/cases/{case_id}/monitor"
    client.post(url, data={"csrf_token": form_token(client, url), "what": "ors", "cups": "2"})
    client.post(url, data={"csrf_token": form_token(client, url), "what": "stool"})
    page = client.get(url).get_data(as_text=True)
    assert re.search(r'id="target">800–850 ml', page)
    assert 'id="given">400 ml' in page
    assert 'id="remaining">400–450 ml' in page
    assert "<svg" in page and "http://" not in page.split("<svg")[1].split("</svg>")[0].replace(
        'xmlns="http://www.w3.org/2000/svg"', "")


def test_puffy_eyelids_warns_to_stop_ors(app, client, users, as_user, clock):
    case_id = seed_case(app, users["chw"])
    as_user("chw")
    url = f"/cases/{case_id}/monitor"
    client.post(url, data={"csrf_token": form_token(client, url), "what": "check",
                           "puffy_eyelids": "y"})
    assert "Puffy eyelids: stop ORS" in client.get(url).get_data(as_text=True)


def test_an_outcome_books_the_follow_up_visit_that_appears_in_the_due_list(
        app, client, users, as_user, clock):
    # S07: dysentery, follow up in 2 days.
    case_id = seed_case(app, users["chw"], signs=NONE, blood_in_stool=True,
                        household_ref="MB-200")
    as_user("chw")
    url = f"/cases/{case_id}/outcome"
    response = client.post(url, data={"csrf_token": form_token(client, url),
                                      "outcome": "recovered_home", "improving": "y"})
    assert response.status_code == 302
    assert "2026-03-04" in client.get(f"/cases/{case_id}").get_data(as_text=True)
    clock.moment = START + timedelta(days=1)
    as_user("chw")  # a day later: a new session
    assert "MB-200" not in client.get("/cases/due").get_data(as_text=True).split(
        "Follow-up visits due")[1]
    clock.moment = START + timedelta(days=2)
    as_user("chw")
    visits = client.get("/cases/due").get_data(as_text=True).split("Follow-up visits due")[1]
    assert "MB-200" in visits and "2026-03-04" in visits
    conn = db.connect(app.config["DATABASE"])
    assert conn.execute("SELECT outcome FROM cases WHERE id = ?",
                        (case_id,)).fetchone()[0] == "recovered_home"
    conn.close()


def test_a_referral_records_where_when_and_how_the_child_went(app, client, users, as_user,
                                                              clock):
    case_id = seed_case(app, users["chw"])
    as_user("nurse")
    clock.moment = START + timedelta(hours=5)
    url = f"/cases/{case_id}/outcome"
    response = client.post(url, data={
        "csrf_token": form_token(client, url), "outcome": "referred",
        "referred_to": "Siwelo District Hospital", "transport": "Motorbike ambulance",
        "referred_minutes_ago": "90"})
    assert response.status_code == 302
    conn = db.connect(app.config["DATABASE"])
    row = conn.execute("SELECT outcome, referred_to, referred_at, transport, at FROM outcomes"
                       " WHERE case_id = ?", (case_id,)).fetchone()
    conn.close()
    # Recorded at 13:00; the child left 90 minutes earlier, at 11:30.
    assert tuple(row) == ("referred", "Siwelo District Hospital", "2026-03-02T11:30:00Z",
                          "Motorbike ambulance", "2026-03-02T13:00:00Z")
    page = client.get(f"/cases/{case_id}").get_data(as_text=True)
    assert "Siwelo District Hospital" in page and "Motorbike ambulance" in page
    assert "left 2026-03-02 11:30" in page


def test_a_negative_referral_delay_is_refused(app, client, users, as_user, clock):
    case_id = seed_case(app, users["chw"])
    as_user("chw")
    url = f"/cases/{case_id}/outcome"
    response = client.post(url, data={"csrf_token": form_token(client, url),
                                      "outcome": "referred", "referred_minutes_ago": "-5"})
    assert response.status_code == 422


def test_views_and_changes_are_audited_without_clinical_content(app, client, users, as_user,
                                                                clock):
    case_id = seed_case(app, users["chw"])
    as_user("chw")
    url = f"/cases/{case_id}/monitor"
    client.post(url, data={"csrf_token": form_token(client, url), "what": "ors", "ml": "150"})
    conn = db.connect(app.config["DATABASE"])
    rows = [(r["action"], r["record_type"]) for r in audit.entries(conn)]
    assert ("case.view", "case") in rows and ("monitoring.create", "monitoring") in rows
    dumped = " ".join(str(tuple(r)) for r in audit.entries(conn))
    assert "150" not in dumped and "ors" not in dumped
    conn.close()


def test_a_danger_sign_at_reassessment_means_urgent_referral(app, client, users, as_user, clock):
    # S07 IMCI general danger signs: refer URGENTLY.
    case_id = seed_case(app, users["chw"])
    as_user("chw")
    token = form_token(client, f"/cases/{case_id}/reassess")
    client.post(f"/cases/{case_id}/reassess", data={"csrf_token": token, **NONE,
                                                    "convulsions": "y"})
    latest = client.get(f"/cases/{case_id}").get_data(as_text=True).split('id="latest"')[1]
    assert "refer URGENTLY" in latest
