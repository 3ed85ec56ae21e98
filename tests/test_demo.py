"""The invented demo clinic gives the supervisor something to look at: cases in every village
over ten weeks, stock receipts, and a rise in one village that raises an unusual-rise alert."""

from __future__ import annotations

import shutil
import subprocess
from datetime import UTC, datetime

import pytest

from clinic_app import demo
from clinic_app.storage import db
from tests.conftest import login

NOW = datetime(2026, 12, 2, 12, 0, tzinfo=UTC)  # a Wednesday of 2026-W49


@pytest.fixture
def demo_app(app):
    app.config["CLOCK"] = lambda: NOW
    with app.app_context():
        conn = db.connect(app.config["DATABASE"])
        logins = demo.seed(conn)
        conn.close()
    assert [u for u, _r, _p in logins] == [s[0] for s in demo.STAFF]
    return app


def _rows(app, sql):
    conn = db.connect(app.config["DATABASE"])
    try:
        return conn.execute(sql).fetchall()
    finally:
        conn.close()


def test_the_demo_cases_cover_every_village_over_ten_weeks_and_are_all_closed(demo_app):
    rows = _rows(demo_app, "SELECT area, created_at, outcome, user_id FROM cases")
    assert {r["area"] for r in rows} == set(demo.VILLAGES)
    assert all(r["outcome"] for r in rows)  # nothing left overdue in anyone's due list
    assert min(r["created_at"] for r in rows) >= "2026-09-21"  # Monday of 2026-W39
    assert max(r["created_at"] for r in rows) < "2026-11-30"  # before this week's Monday
    amina = _rows(demo_app, "SELECT id FROM users WHERE username = 'amina'")[0]["id"]
    assert amina not in {r["user_id"] for r in rows}  # her lists stay empty for the browser tests


def test_the_supervisor_sees_weekly_counts_supplies_and_the_village_rise(demo_app):
    client = demo_app.test_client()
    login(client, "tomas", "demo-super-tomas")
    weeks = client.get("/api/v1/tallies?from=2026-W39&to=2026-W48").get_json()["weeks"]
    assert sum(w["cases"] for w in weeks) == len(_rows(demo_app, "SELECT id FROM cases"))
    assert sum(w["ors_sachets"] for w in weeks) > 0 and weeks[-1]["cases"] >= demo.RISE_CASES
    siwelo = client.get("/api/v1/tallies?from=2026-W48&to=2026-W48&area=Siwelo").get_json()
    assert siwelo["weeks"][0]["cases"] == demo.RISE_CASES
    supplies = client.get("/supervisor/supplies").get_data(as_text=True)
    assert "Grace Nkhoma" in supplies  # she entered the receipts
    assert "Siwelo" in client.get("/supervisor/alerts").get_data(as_text=True)
    raised = [tuple(r) for r in _rows(demo_app, "SELECT kind, area, week FROM alerts")]
    assert ("ears", "Siwelo", "2026-W48") in raised
    assert not [kind for kind, _area, _week in raised if kind.startswith("cholera")]


def test_seeding_twice_adds_nothing(demo_app):
    before = len(_rows(demo_app, "SELECT id FROM cases"))
    with demo_app.app_context():
        conn = db.connect(demo_app.config["DATABASE"])
        assert demo.seed(conn) == []
        conn.close()
    assert len(_rows(demo_app, "SELECT id FROM cases")) == before


def test_seed_demo_staff_only_prints_the_logins_and_adds_no_cases(app, runner):
    result = runner.invoke(args=["seed-demo", "--staff-only"])
    assert result.exit_code == 0 and "demo-chw-amina" in result.output
    assert _rows(app, "SELECT count(*) FROM cases")[0][0] == 0
    assert _rows(app, "SELECT count(*) FROM stock_movements")[0][0] == 0


@pytest.mark.skipif(shutil.which("pdftotext") is None, reason="needs poppler's pdftotext")
def test_the_weekly_report_pdf_holds_the_tallies_the_chart_and_the_alerts(demo_app, tmp_path):
    client = demo_app.test_client()
    login(client, "tomas", "demo-super-tomas")
    response = client.get("/supervisor/export/report.pdf?from=2026-W39&to=2026-W48")
    assert response.status_code == 200 and response.data[:5] == b"%PDF-"
    (tmp_path / "report.pdf").write_bytes(response.data)
    text = subprocess.run(["pdftotext", str(tmp_path / "report.pdf"), "-"], check=True,
                          capture_output=True, text=True).stdout
    assert "2026-W39" in text and "2026-W48" in text  # the weeks of the tallies table
    assert "Cases by severity" in text  # the chart's title
    alerts = text.rsplit("Alerts", 1)[1]  # the report's last section
    assert "Siwelo" in alerts and "No alerts." not in alerts


@pytest.mark.parametrize("first", ["2026-W37", "2025-W49"])  # 12 and 52 weeks to 2026-W48
def test_the_trend_charts_draw_12_to_52_weeks_and_one_small_chart_per_village(demo_app, first):
    client = demo_app.test_client()
    login(client, "tomas", "demo-super-tomas")
    page = client.get(f"/supervisor/?from={first}&to=2026-W48").get_data(as_text=True)
    charts = page.split("<svg")[1:]
    assert len(charts) == 1 + len(demo.VILLAGES)  # severity trend, then one per village
    assert all(f"<title>{v}" in page for v in demo.VILLAGES)
    assert "http" not in "".join(c.split("</svg>")[0].replace(
        'xmlns="http://www.w3.org/2000/svg"', "") for c in charts)
