"""Server-drawn SVG charts for the supervisor pages and the weekly PDF.

No scripts, no external resources, no CSS: presentation attributes only, so the strict CSP
holds and WeasyPrint draws the same picture. Series differ by marker shape and dash
pattern, never by colour alone; every chart has a <title> and a text legend.
"""

from __future__ import annotations

from collections.abc import Sequence

from markupsafe import Markup, escape

# (marker, dash pattern) per series, in order: circle/solid, square/dashed, triangle/dotted...
STYLES = (("circle", ""), ("square", "6 3"), ("triangle", "2 3"), ("diamond", "8 3 2 3"))
INK = "#1b1b1b"


def _marker(shape: str, x: float, y: float, r: float = 3.5) -> str:
    if shape == "circle":
        return f'<circle cx="{x:.1f}" cy="{y:.1f}" r="{r}" fill="{INK}"/>'
    if shape == "square":
        return (
            f'<rect x="{x - r:.1f}" y="{y - r:.1f}" width="{2 * r}" height="{2 * r}"'
            f' fill="white" stroke="{INK}" stroke-width="1.5"/>'
        )
    if shape == "triangle":
        pts = f"{x:.1f},{y - r - 1:.1f} {x - r - 1:.1f},{y + r:.1f} {x + r + 1:.1f},{y + r:.1f}"
        return f'<polygon points="{pts}" fill="{INK}"/>'
    pts = f"{x:.1f},{y - r - 1:.1f} {x + r + 1:.1f},{y:.1f} {x:.1f},{y + r + 1:.1f} {x - r - 1:.1f},{y:.1f}"
    return f'<polygon points="{pts}" fill="white" stroke="{INK}" stroke-width="1.5"/>'


def _nice_max(value: float) -> int:
    """A round axis top at or above ``value`` (at least 1)."""
    top = max(1, int(value + 0.999))
    for step in (1, 2, 5, 10, 20, 25, 50, 100, 200, 250, 500, 1000, 2000, 5000, 10000):
        if top <= step * 4:
            return -(-top // step) * step
    return top


def line_chart(
    title: str,
    x_labels: Sequence[str],
    series: dict[str, Sequence[float]],
    *,
    width: int = 640,
    height: int = 260,
    limit: Sequence[float | None] | None = None,
    limit_label: str = "",
    legend: bool = True,
) -> Markup:
    """Lines with markers over weeks; ``limit`` draws a dashed threshold (e.g. an EARS bound)."""
    left, right, top, bottom = 40, 10, 24, 42 if legend else 24
    plot_w, plot_h = width - left - right, height - top - bottom
    values = [v for s in series.values() for v in s] + [v for v in (limit or []) if v is not None]
    y_max = _nice_max(max(values, default=1))
    n = max(len(x_labels), 1)

    def x(i: int) -> float:
        return left + (plot_w * (i + 0.5) / n)

    def y(v: float) -> float:
        return top + plot_h - plot_h * v / y_max

    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" role="img" viewBox="0 0 {width} {height}"'
        f' width="{width}" height="{height}" font-family="sans-serif" font-size="10">',
        f"<title>{escape(title)}</title>",
        f'<text x="{left}" y="14" font-size="12" font-weight="bold">{escape(title)}</text>',
    ]
    for tick in (0, y_max // 2, y_max):
        parts.append(
            f'<line x1="{left}" x2="{width - right}" y1="{y(tick):.1f}" y2="{y(tick):.1f}"'
            f' stroke="#bbbbbb" stroke-width="0.5"/>'
            f'<text x="{left - 4}" y="{y(tick) + 3:.1f}" text-anchor="end">{tick}</text>'
        )
    every = max(1, -(-n // 12))
    for i, label in enumerate(x_labels):
        if i % every == 0:
            parts.append(
                f'<text x="{x(i):.1f}" y="{top + plot_h + 12}" text-anchor="middle">'
                f"{escape(label[-3:])}</text>"
            )
    if limit:
        points = " ".join(f"{x(i):.1f},{y(v):.1f}" for i, v in enumerate(limit) if v is not None)
        parts.append(
            f'<polyline points="{points}" fill="none" stroke="{INK}" stroke-width="1"'
            f' stroke-dasharray="1 4"/>'
        )
    for (name, data), (shape, dash) in zip(series.items(), STYLES, strict=False):
        points = " ".join(f"{x(i):.1f},{y(v):.1f}" for i, v in enumerate(data))
        dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
        parts.append(
            f'<polyline points="{points}" fill="none" stroke="{INK}" stroke-width="1.5"'
            f"{dash_attr}><title>{escape(name)}</title></polyline>"
        )
        parts.extend(_marker(shape, x(i), y(v)) for i, v in enumerate(data))
    if legend:
        parts.append(_legend(series, top + plot_h + 30, left, limit_label if limit else ""))
    parts.append("</svg>")
    return Markup("".join(parts))


def _legend(series: dict, y: float, x: float, limit_label: str) -> str:
    out = []
    for name, (shape, dash) in zip(series, STYLES, strict=False):
        dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
        out.append(
            f'<line x1="{x:.1f}" x2="{x + 24:.1f}" y1="{y:.1f}" y2="{y:.1f}" stroke="{INK}"'
            f' stroke-width="1.5"{dash_attr}/>{_marker(shape, x + 12, y)}'
            f'<text x="{x + 30:.1f}" y="{y + 3:.1f}">{escape(name)}</text>'
        )
        x += 40 + 6 * len(str(name))
    if limit_label:
        out.append(
            f'<line x1="{x:.1f}" x2="{x + 24:.1f}" y1="{y:.1f}" y2="{y:.1f}" stroke="{INK}"'
            f' stroke-dasharray="1 4"/><text x="{x + 30:.1f}" y="{y + 3:.1f}">'
            f"{escape(limit_label)}</text>"
        )
    return "".join(out)
