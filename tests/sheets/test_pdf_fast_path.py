"""The PDF renderer's two shortcuts for the sheet: expat for polyglot markup, and the sheet's
own small user-agent stylesheet (static/css/sheet-ua.css). Both must leave the page as
WeasyPrint's own parser and user-agent sheet draw it."""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pytest

from clinic_app import pdf
from clinic_app.web import sheets

from .helpers import CHILD, LANGUAGES, quick_sheet

needs_poppler = pytest.mark.skipif(shutil.which("pdftoppm") is None,
                                   reason="poppler-utils is not installed (make setup)")

URGENT = {"age_months": 20, "weight_kg": 10,
          "signs": {"condition": "lethargic", "eyes": "sunken", "drinking": "unable",
                    "skin_pinch": "very_slow"}}


def pdf_calls(monkeypatch) -> list[tuple]:
    """Record the arguments of every html_to_pdf call (and still render)."""
    calls = []
    real = pdf.html_to_pdf
    monkeypatch.setattr(pdf, "html_to_pdf", lambda *a: calls.append(a) or real(*a))
    return calls


def page_image(data: bytes, tmp_path: Path, name: str) -> bytes:
    path = tmp_path / f"{name}.pdf"
    path.write_bytes(data)
    subprocess.run(["pdftoppm", "-png", "-r", "60", "-singlefile", str(path),
                    str(tmp_path / name)], check=True)
    return (tmp_path / f"{name}.png").read_bytes()


@pytest.mark.parametrize("lang", LANGUAGES)
def test_the_pdf_markup_of_every_language_takes_the_fast_parser(client, as_user, monkeypatch,
                                                               lang):
    calls = pdf_calls(monkeypatch)
    token = as_user("nurse")
    for child in (CHILD, URGENT):
        assert quick_sheet(client, token, lang, fmt="pdf", child=child).status_code == 200
    assert len(calls) == 2
    for html, _root, _stylesheets, _zoom, user_agent in calls:
        assert pdf.xml_tree(html) is not None, "the sheet's markup is no longer well-formed XML"
        assert user_agent == sheets.USER_AGENT_SHEET


@needs_poppler
@pytest.mark.parametrize(("lang", "size", "child"), [("en", "a4", CHILD), ("ar", "letter", URGENT),
                                                     ("hi", "a5", CHILD)])
def test_the_shortcuts_draw_the_same_page_as_weasyprint_itself(client, as_user, monkeypatch,
                                                               tmp_path, lang, size, child):
    calls = pdf_calls(monkeypatch)
    response = quick_sheet(client, as_user("nurse"), lang, fmt="pdf", size=size, child=child)
    assert response.status_code == 200
    [(html, static_root, stylesheets, zoom, user_agent)] = calls
    assert user_agent == sheets.USER_AGENT_SHEET
    own = page_image(response.data, tmp_path, "fast")
    monkeypatch.undo()  # the real html_to_pdf again
    monkeypatch.setattr(pdf, "xml_tree", lambda _html: None)  # WeasyPrint's HTML5 parser...
    slow = pdf.html_to_pdf(html, static_root, stylesheets, zoom, None)  # ...and its UA sheet
    assert page_image(slow, tmp_path, "slow") == own


def test_the_small_user_agent_sheet_covers_every_element_of_the_sheet(client, as_user,
                                                                      monkeypatch, app):
    calls = pdf_calls(monkeypatch)
    token = as_user("nurse")
    for child in (CHILD, URGENT):
        assert quick_sheet(client, token, "en", fmt="pdf", child=child).status_code == 200
    used = {element.tag for html, *_ in calls for element in pdf.xml_tree(html).iter()}
    ua = (Path(app.static_folder) / sheets.USER_AGENT_SHEET).read_text(encoding="utf-8")
    displayed = set()
    for selectors in re.findall(r"^([a-z0-9, \[\]=]+)\{ display:", ua, re.M):
        displayed |= {name.strip() for name in selectors.split(",")}
    # Elements without a display rule are inline, as in WeasyPrint's own sheet.
    inline = {"span", "strong", "img"}
    assert used <= displayed | inline, used - displayed - inline


def test_markup_that_is_not_xml_still_renders_through_weasyprints_parser(app):
    page = "<!doctype html><html><body><p>Unclosed paragraph<p>and a second one</body></html>"
    assert pdf.xml_tree(page) is None
    document = pdf._document_class()(page, pdf.BASE_URL, pdf.local_fetcher(app.static_folder))
    assert [p.text for p in document.etree_element.iter("p")] == ["Unclosed paragraph",
                                                                 "and a second one"]
    data = pdf.html_to_pdf(page, app.static_folder, (), 1, sheets.USER_AGENT_SHEET)
    assert data.startswith(b"%PDF")


def test_weasyprint_still_has_what_the_shortcuts_replace(app):
    """If a WeasyPrint release renames these, the shortcuts stop applying (same page, slower):
    this test says so instead of a silent loss of speed."""
    import weasyprint

    assert callable(getattr(weasyprint.HTML, "_ua_stylesheets", None))
    document = weasyprint.HTML(string="<p>x</p>")
    assert hasattr(document, "wrapper_element") and hasattr(document, "etree_element")
