"""The supervisor pages: access by role, tallies page, alerts, supplies and downloads."""

from __future__ import annotations

import csv
import io
import re
from datetime import UTC, datetime

import pytest

from clinic_app.storage import db
from tests.supervisor.synthetic import store, synthetic_case

PAGES = [
    "/supervisor/",
    "/supervisor/alerts",
    "/supervisor/export/cases.csv",
    "/supervisor/export/weekly.csv",
]
RANGE = "?from=2026-W51&to=2027-W02"


@pytest.fixture
def fixed_clock(app):
    # Thursday of 2027-W03: the last complete week is 2027-W02.
    app.config["CLOCK"] = lambda: datetime(2027, 1, 21, 10, 0, tzinfo=UTC)
    return app


def csrf_from(html: str) -> str:
    return re.search(r'name="csrf_token"[^>]*value="([^"]+)"', html).group(1)


@pytest.mark.parametrize("url", [*PAGES, "/supervisor/supplies", "/api/v1/tallies" + RANGE])
def test_a_chw_gets_403_on_every_supervisor_page_and_the_tallies(client, as_user, url):
    as_user("chw")
    assert client.get(url).status_code == 403


@pytest.mark.parametrize("persona", ["supervisor", "admin"])
@pytest.mark.parametrize("url", PAGES)
def test_supervisors_and_admins_get_the_pages(client, as_user, fixed_clock, persona, url):
    as_user(persona)
    assert client.get(url + RANGE).status_code == 200


def test_a_nurse_may_enter_stock_but_not_see_the_tallies(client, as_user, fixed_clock):
    as_user("nurse")
    assert client.get("/supervisor/").status_code == 403
    page = client.get("/supervisor/supplies")
    assert page.status_code == 200
    response = client.post("/supervisor/supplies", data={
        "csrf_token": csrf_from(page.get_data(as_text=True)), "item": "ors_sachets",
        "kind": "receipt", "quantity": "500", "reason": "district store"})  # fmt: skip
    assert response.status_code == 303
    assert ">500<" in client.get("/supervisor/supplies").get_data(as_text=True)


def test_a_supervisor_may_view_supplies_but_not_enter_stock(client, as_user, fixed_clock):
    token = as_user("supervisor")
    page = client.get("/supervisor/supplies")
    assert page.status_code == 200 and 'name="quantity"' not in page.get_data(as_text=True)
    response = client.post("/supervisor/supplies", data={
        "csrf_token": token, "item": "ors_sachets", "kind": "receipt", "quantity": "5"})
    assert response.status_code == 403


def test_stock_left_is_receipts_minus_what_the_cases_used(client, as_user, seeded, fixed_clock):
    as_user("admin")
    page = client.get("/supervisor/supplies")
    client.post("/supervisor/supplies", data={
        "csrf_token": csrf_from(page.get_data(as_text=True)), "item": "zinc_tablets",
        "kind": "receipt", "quantity": "20000"})  # fmt: skip
    used = sum(c["zinc_tablets"] for c in seeded if not c["quarantined"])
    html = client.get("/supervisor/supplies").get_data(as_text=True)
    assert f">{20000 - used}<" in html


def test_the_tallies_page_shows_the_weeks_charts_and_ears(client, as_user, seeded, fixed_clock):
    as_user("supervisor")
    html = client.get("/supervisor/" + RANGE).get_data(as_text=True)
    assert "W53" in html and "<svg" in html
    assert "http://" not in html.replace('xmlns="http://www.w3.org/2000/svg"', "")
    assert "Mbeza" in html and "C3" in html
    total = sum(not c["quarantined"] for c in seeded)
    assert f"<strong>{total}</strong>" in html


def test_a_bad_week_gives_a_clear_400_page(client, as_user):
    as_user("supervisor")
    response = client.get("/supervisor/?from=2025-W53&to=2026-W02")
    assert response.status_code == 400
    assert b"ISO week" in response.data and b"Traceback" not in response.data


def test_the_case_csv_holds_no_household_references_or_notes(client, as_user, seeded, app):
    as_user("supervisor")
    response = client.get("/supervisor/export/cases.csv" + RANGE)
    text = response.get_data(as_text=True)
    header = next(csv.reader(io.StringIO(text)))
    assert "household_ref" not in header and "note" not in header
    assert "HH-SECRET" not in text and "private note" not in text
    assert len(text.strip().splitlines()) - 1 == sum(not c["quarantined"] for c in seeded)
    assert response.headers["Content-Disposition"].startswith("attachment")


def test_every_download_is_audit_logged(client, as_user, app, users):
    as_user("supervisor")
    for url in ["/supervisor/export/cases.csv", "/supervisor/export/weekly.csv"]:
        client.get(url + RANGE)
    conn = db.connect(app.config["DATABASE"])
    logged = conn.execute(
        "SELECT user_id, action, record_type, record_id FROM audit_log WHERE action = 'export'"
    ).fetchall()
    assert [tuple(r) for r in logged] == [
        (users["supervisor"], "export", "cases_csv", "2026-W51..2027-W02"),
        (users["supervisor"], "export", "weekly_csv", "2026-W51..2027-W02"),
    ]


def test_the_weekly_csv_has_one_row_per_week_with_the_counters(client, as_user, seeded):
    as_user("supervisor")
    rows = list(csv.DictReader(io.StringIO(
        client.get("/supervisor/export/weekly.csv" + RANGE).get_data(as_text=True))))
    assert [r["week"] for r in rows] == ["2026-W51", "2026-W52", "2026-W53", "2027-W01", "2027-W02"]
    assert sum(int(r["cases"]) for r in rows) == sum(not c["quarantined"] for c in seeded)


def two_severe_adults(conn, users):
    # S27 alert: two suspected cases aged >= 2 years with severe dehydration, one area, 7 days.
    for n, day in enumerate(["2027-01-18", "2027-01-20"]):
        case = synthetic_case(__import__("random").Random(n), 8000 + n, [users["chw"]])
        case.update(created_at=f"{day}T09:00:00+03:00", area="Mbeza", age_months=300,
                    severity="severe", plan="C", classifications=["suspected_cholera"],
                    blood_in_stool=False, diarrhoea_days=1, quarantined=False)  # fmt: skip
        store(conn, case)


def test_a_cholera_cluster_is_listed_and_can_be_acknowledged(client, as_user, app, users,
                                                               fixed_clock):  # fmt: skip
    conn = db.connect(app.config["DATABASE"])
    two_severe_adults(conn, users)
    as_user("supervisor")
    page = client.get("/supervisor/alerts").get_data(as_text=True)
    assert "Suspected cholera: 2 severe cases" in page and "case-08000" in page
    query = "SELECT id, acknowledged_by, comment FROM alerts WHERE kind = 'cholera_cluster'"
    alert_id = conn.execute(query).fetchone()["id"]
    url = f"/supervisor/alerts/{alert_id}/acknowledge"
    assert url in page
    token = csrf_from(page)
    client.post(url, data={"csrf_token": token, "comment": ""})
    assert conn.execute(query).fetchone()["acknowledged_by"] is None
    client.post(url, data={"csrf_token": token, "comment": "Team sent to Mbeza"})
    row = conn.execute(query).fetchone()[1:]
    assert tuple(row) == (users["supervisor"], "Team sent to Mbeza")
    assert "Team sent to Mbeza" in client.get("/supervisor/alerts").get_data(as_text=True)


def test_an_unusual_rise_in_an_area_raises_an_ears_alert_with_its_baseline(
    client, as_user, app, users, fixed_clock
):
    # Reference §B2 series, weeks 2026-W44 .. 2027-W02 (12 weeks, W53 included), one area.
    conn = db.connect(app.config["DATABASE"])
    series = [4, 6, 5, 3, 7, 5, 4, 6, 5, 9, 14, 20]
    from clinic_app.surveillance.isoweek import parse_week

    n = 0
    for i, count in enumerate(series):
        monday = parse_week("2026-W44").shift(i).monday
        for _ in range(count):
            case = synthetic_case(__import__("random").Random(n), 7000 + n, [users["chw"]])
            case.update(created_at=f"{monday}T11:00:00Z", area="Kantolo", quarantined=False,
                        classifications=[], severity="none", plan="A")  # fmt: skip
            store(conn, case)
            n += 1
    as_user("supervisor")
    page = client.get("/supervisor/alerts").get_data(as_text=True)
    assert "Unusual rise in weekly cases" in page and "2027-W02" in page
    assert "5.00" in page and "1.29" in page  # C2 baseline mean and SD of week 12 (§B2)
    assert "11.62" in page  # C2 value of week 12 (§B2)


def test_the_weekly_report_pdf_is_a_pdf_and_logged(client, as_user, app, seeded, fixed_clock):
    as_user("supervisor")
    response = client.get("/supervisor/export/report.pdf" + RANGE)
    assert response.status_code == 200 and response.data[:5] == b"%PDF-"
    conn = db.connect(app.config["DATABASE"])
    kinds = [r[0] for r in conn.execute("SELECT record_type FROM audit_log WHERE action='export'")]
    assert kinds == ["weekly_report_pdf"]


def test_the_home_menu_leads_each_role_to_its_supervisor_pages(client, as_user):
    as_user("nurse")
    home = client.get("/").get_data(as_text=True)
    assert "/supervisor/supplies" in home and 'href="/supervisor/"' not in home
    as_user("supervisor")  # a new login replaces the nurse's session
    assert 'href="/supervisor/"' in client.get("/").get_data(as_text=True)


def test_the_low_stock_threshold_is_the_one_the_admin_saved(app, client, as_user, fixed_clock):
    from clinic_app.storage import profile

    conn = db.connect(app.config["DATABASE"])
    with db.write(conn):
        profile.save(conn, profile.ClinicProfile(stock_alert_weeks=7), user_id=None,
                     at="2027-01-20T09:00:00Z")
    as_user("supervisor")
    html = client.get("/supervisor/supplies").get_data(as_text=True)
    assert "fewer than 7 weeks left" in html
