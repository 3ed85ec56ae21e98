"""Render the app icons (PNG) from static/icons/icon.svg with Debian's Chromium.

Run: .venv/bin/python scripts/make_icons.py   (the PNGs are committed; rerun after editing the SVG)
The maskable icon puts the drop inside the central 80 % safe zone on a full-bleed background.
"""

from __future__ import annotations

import base64
from pathlib import Path

from playwright.sync_api import sync_playwright

ROOT = Path(__file__).resolve().parents[1]
ICONS = ROOT / "static" / "icons"
BACKGROUND = "#0b5d7a"  # the SVG's own background colour


def page_html(svg_b64: str, size: int, inset: float, background: str) -> str:
    pad = round(size * inset)
    return (f"<html><body style='margin:0;background:{background};width:{size}px;"
            f"height:{size}px'><img src='data:image/svg+xml;base64,{svg_b64}' "
            f"style='display:block;margin:{pad}px;width:{size - 2 * pad}px;"
            f"height:{size - 2 * pad}px'></body></html>")


def main() -> None:
    svg_b64 = base64.b64encode((ICONS / "icon.svg").read_bytes()).decode()
    targets = [("icon-192.png", 192, 0.0, "transparent"), ("icon-512.png", 512, 0.0,
               "transparent"), ("maskable-512.png", 512, 0.14, BACKGROUND)]
    with sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path="/usr/bin/chromium", headless=True,
                                     args=["--no-sandbox", "--disable-gpu"])
        for name, size, inset, background in targets:
            page = browser.new_page(viewport={"width": size, "height": size})
            page.set_content(page_html(svg_b64, size, inset, background))
            page.screenshot(path=str(ICONS / name), omit_background=background == "transparent")
            page.close()
            print(f"wrote {ICONS / name}")
        browser.close()


if __name__ == "__main__":
    main()
