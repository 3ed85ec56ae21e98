"""The fluid-balance chart: self-contained SVG whose lines differ by more than colour."""

from __future__ import annotations

from datetime import timedelta

from clinic_app.clinical import monitoring
from clinic_app.clinical.assess import assess
from clinic_app.clinical.types import ClinicSettings
from clinic_app.web import fluid_chart

from .followup_helpers import SOME, START


def chart(app):
    result = assess({"age_months": 18, "weight_kg": 10, "signs": SOME}, ClinicSettings())
    entries = [{"at": START + timedelta(minutes=30), "kind": "intake", "what": "ors",
                "ml": 200, "cups": None},
               {"at": START + timedelta(minutes=60), "kind": "output", "what": "stool",
                "ml": None}]
    balance = monitoring.fluid_balance(result, 18, entries, cup_ml=200)
    with app.test_request_context():
        return str(fluid_chart.render(balance, START, START + timedelta(hours=2)))


def test_the_chart_loads_nothing_from_outside(app):
    svg = chart(app)
    assert svg.startswith("<svg") and svg.endswith("</svg>")
    assert "href" not in svg and "url(" not in svg and "<image" not in svg


def test_each_line_has_its_own_dash_marker_shape_and_label(app):
    svg = chart(app)
    assert 'stroke-dasharray="6 4"' in svg and 'stroke-dasharray="2 3"' in svg
    assert "<circle" in svg and "<rect" in svg and "Z\"/>" in svg  # circle, square, triangle
    for label in ("Given", "Target", "Losses"):
        assert f">{label}</text>" in svg
    assert "given 200 ml, target 800 ml" in svg  # 750 ml plan (S04) + one stool 50 ml (S03)
