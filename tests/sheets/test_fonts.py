"""Every character a catalog or a sheet can print is drawn by a bundled Noto font."""

from __future__ import annotations

import html
import re
import unicodedata
from functools import lru_cache
from pathlib import Path

import pytest
from babel.messages.pofile import read_po
from fontTools.ttLib import TTFont

from clinic_app.i18n_export import languages, po_path

from .helpers import LANGUAGES, quick_sheet

ROOT = Path(__file__).resolve().parents[2]
FONTS = ROOT / "static" / "fonts"


@lru_cache(maxsize=1)
def covered() -> frozenset[int]:
    points: set[int] = set()
    for path in FONTS.glob("*.ttf"):
        points.update(TTFont(path, lazy=True).getBestCmap())
    return frozenset(points)


def missing(text: str) -> set[str]:
    # Format characters (bidi marks) and line breaks are layout, not glyphs.
    return {c for c in text if c not in "\n\r\t" and unicodedata.category(c) != "Cf"
            and ord(c) not in covered()}


def test_the_bundled_fonts_are_the_three_noto_families_with_their_licence():
    names = sorted(p.name for p in FONTS.glob("*.ttf"))
    assert names == ["NotoSans-Bold.ttf", "NotoSans-Regular.ttf", "NotoSansArabic-Bold.ttf",
                     "NotoSansArabic-Regular.ttf", "NotoSansDevanagari-Bold.ttf",
                     "NotoSansDevanagari-Regular.ttf"]
    assert "SIL OPEN FONT LICENSE Version 1.1" in (FONTS / "OFL.txt").read_text()
    assert sum(p.stat().st_size for p in FONTS.glob("*.ttf")) < 3_000_000


def test_the_coverage_check_can_fail():
    assert missing("\u4e2d") == {"\u4e2d"}  # a Han character: no bundled font has it
    assert missing("हिन्दी العربية Kiswahili") == set()


@pytest.mark.parametrize("lang", languages()[1:])
def test_every_translation_in_the_catalog_is_covered_by_a_bundled_font(lang):
    with po_path(lang).open("rb") as fh:
        catalog = read_po(fh, locale=lang)
    text = "".join(m.string if isinstance(m.string, str) else "".join(m.string)
                   for m in catalog if m.id)
    assert missing(text) == set()


def test_every_character_of_the_sheet_templates_is_covered():
    text = "".join(p.read_text(encoding="utf-8")
                   for p in (ROOT / "clinic_app" / "templates" / "sheets").glob("*.html"))
    assert missing(text) == set()


@pytest.mark.parametrize("lang", LANGUAGES)
def test_every_character_of_a_rendered_sheet_is_covered(client, as_user, lang):
    """Covers what Babel adds too: units, month names, language names in the chooser."""
    page = quick_sheet(client, as_user("nurse"), lang).get_data(as_text=True)
    chooser = client.get("/sheet/quick").get_data(as_text=True)
    text = html.unescape(re.sub(r"<[^>]+>", " ", page + chooser))
    assert missing(text) == set()
