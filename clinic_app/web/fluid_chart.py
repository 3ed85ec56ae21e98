"""The fluid-balance chart: an SVG drawn on the server, with no external resources.

Three step lines over time: given so far (solid, circle markers), the target (dashed, square
markers, stepping up with each stool) and measured losses (dotted, triangle markers). Lines
differ by dash pattern and marker shape and carry text labels, never by colour alone.
"""

from __future__ import annotations

from datetime import datetime

from markupsafe import Markup, escape

from clinic_app.clinical.rulebook import RULES
from clinic_app.i18n import _

SERIES = (  # (key, css class, dash pattern, marker)
    ("given_ml", "given", "", "circle"),
    ("target_low", "target", "6 4", "square"),
    ("losses_ml", "losses", "2 3", "triangle"),
)


def _marker(shape: str, x: float, y: float) -> str:
    if shape == "circle":
        return f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3.5"/>'
    if shape == "square":
        return f'<rect x="{x - 3.5:.1f}" y="{y - 3.5:.1f}" width="7" height="7"/>'
    return f'<path d="M{x:.1f} {y - 4.5:.1f} L{x + 4:.1f} {y + 3:.1f} L{x - 4:.1f} {y + 3:.1f} Z"/>'


def _step_path(points: list[tuple[float, float]]) -> str:
    out = []
    for i, (x, y) in enumerate(points):
        if i == 0:
            out.append(f"M{x:.1f} {y:.1f}")
        else:
            out.append(f"H{x:.1f} V{y:.1f}")
    return " ".join(out)


def render(balance: dict, started_at: datetime, now: datetime) -> Markup:
    """The chart for ``monitoring.fluid_balance`` output, from the plan start to ``now``."""
    size = RULES["followup_chart"]
    width, height, margin = size["width"], size["height"], size["margin"]
    series = balance["series"]
    start = started_at.timestamp()
    end = max([now.timestamp(), start + 3600] + [p["at"].timestamp() for p in series])
    top_values = [balance["target_high"] or 0] + [max(p["given_ml"], p["losses_ml"])
                                                   for p in series]
    top = max(max(top_values), 100)

    def x(moment: float) -> float:
        return margin + (moment - start) / (end - start) * (width - 2 * margin)

    def y(ml: float) -> float:
        return height - margin - ml / top * (height - 2 * margin)

    title = _("Fluid balance: given %(given)s ml, target %(target)s ml, losses %(losses)s ml",
              given=balance["given_ml"], target=balance["target_low"] or 0,
              losses=balance["losses_ml"])
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" class="fluid-chart" role="img" '
             f'viewBox="0 0 {width} {height}" aria-labelledby="chart-title">',
             f'<title id="chart-title">{escape(title)}</title>',
             f'<line class="axis" x1="{margin}" y1="{height - margin}" x2="{width - margin}" '
             f'y2="{height - margin}"/>',
             f'<line class="axis" x1="{margin}" y1="{margin}" x2="{margin}" '
             f'y2="{height - margin}"/>',
             f'<text class="tick" x="{margin - 4}" y="{margin + 4}" text-anchor="end">{top}</text>',
             f'<text class="tick" x="{margin - 4}" y="{height - margin}" text-anchor="end">0</text>']
    base = {"given_ml": 0, "losses_ml": 0, "target_low": balance["plan_volume_ml"] or 0}
    for key, css, dash, shape in SERIES:
        if key == "target_low" and balance["target_low"] is None:
            continue
        points = [(x(start), y(base[key]))] + [(x(p["at"].timestamp()), y(p[key] or 0))
                                               for p in series]
        points.append((x(end), points[-1][1]))
        dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
        parts.append(f'<path class="line {css}" fill="none" d="{_step_path(points)}"{dash_attr}/>')
        parts.append(f'<g class="marks {css}">'
                     + "".join(_marker(shape, px, py) for px, py in points[1:-1]) + "</g>")
    labels = {"given_ml": _("Given"), "target_low": _("Target"), "losses_ml": _("Losses")}
    for i, (key, css, dash, shape) in enumerate(SERIES):
        lx, ly = margin + 8 + i * 95, 14
        dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
        parts.append(f'<line class="line {css}" x1="{lx}" y1="{ly}" x2="{lx + 22}" y2="{ly}"'
                     f'{dash_attr}/><g class="marks {css}">{_marker(shape, lx + 11, ly)}</g>'
                     f'<text class="legend" x="{lx + 26}" y="{ly + 4}">{escape(labels[key])}'
                     f'</text>')
    parts.append("</svg>")
    return Markup("".join(parts))
