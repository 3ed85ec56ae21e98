"""The PDF sheets (kept few: each render takes a second or more) and the PDF adapter."""

from __future__ import annotations

import re
import shutil
import subprocess
import sys

import pytest

from clinic_app import pdf
from clinic_app.storage import audit, db

from ..web.followup_helpers import seed_case
from .helpers import KEY_PHRASE, LANGUAGES, SCRIPT, TOTAL_1200, quick_sheet

needs_poppler = pytest.mark.skipif(shutil.which("pdftotext") is None,
                                   reason="poppler-utils is not installed (make setup)")
BIDI_MARKS = re.compile("[\u200e\u200f\u202a-\u202e\u2066-\u2069]")


def pdf_text(data: bytes, tmp_path) -> str:
    path = tmp_path / "sheet.pdf"
    path.write_bytes(data)
    text = subprocess.run(["pdftotext", str(path), "-"], capture_output=True, check=True,
                          text=True).stdout
    return BIDI_MARKS.sub("", text)


@needs_poppler
@pytest.mark.slow
@pytest.mark.parametrize("lang", LANGUAGES)
def test_the_pdf_holds_the_volumes_in_the_locales_format_and_the_right_script(
        client, as_user, tmp_path, lang):
    response = quick_sheet(client, as_user("nurse"), lang, fmt="pdf")
    assert response.status_code == 200 and response.mimetype == "application/pdf"
    text = pdf_text(response.data, tmp_path)
    # S04: 75 ml/kg x 16 kg = 1200 ml. pdftotext writes French's narrow no-break space as a
    # plain space; the grouping still differs from "1,200" and "1.200".
    assert TOTAL_1200[lang].replace("\u202f", " ") in text
    # pdftotext may split Devanagari clusters and reorders Arabic runs: compare letters only.
    letters = re.sub(r"\s", "", text)
    if lang in SCRIPT:
        low, high = SCRIPT[lang]
        assert sum(low <= c <= high for c in text) > 200
    if lang != "ar":
        assert re.sub(r"\s", "", KEY_PHRASE[lang]) in letters
    assert len(re.findall(r"\d", text)) > 20
    fonts_path = tmp_path / "sheet.pdf"
    info = subprocess.run(["pdfinfo", str(fonts_path)], capture_output=True, check=True,
                          text=True).stdout
    assert re.search(r"^Pages:\s+1$", info, re.M), "the A4 sheet must fit on one page"
    fonts = subprocess.run(["pdffonts", str(fonts_path)], capture_output=True, check=True,
                           text=True).stdout.splitlines()[2:]
    assert fonts and all(" yes " in row for row in fonts)  # every font embedded
    # The @font-face names of static/css/sheet.css: only the bundled files carry them.
    family = {"hi": "+Sheet-Devanagari", "ar": "+Sheet-Arabic"}.get(lang, "+Sheet-Sans")
    assert any(family in row for row in fonts), fonts


@needs_poppler
def test_a_case_pdf_is_audited_and_a_repeat_comes_from_the_cache(app, client, users, as_user,
                                                                 monkeypatch, tmp_path):
    pdf.cache.clear()
    case_id = seed_case(app, users["chw"])
    as_user("chw")
    renders = []
    real = pdf.html_to_pdf
    monkeypatch.setattr(pdf, "html_to_pdf", lambda *a: renders.append(1) or real(*a))
    first = client.get(f"/cases/{case_id}/sheet.pdf?lang=fr&size=letter")
    second = client.get(f"/cases/{case_id}/sheet.pdf?lang=fr&size=letter")
    assert first.status_code == second.status_code == 200
    assert first.data == second.data and len(renders) == 1
    a5 = client.get(f"/cases/{case_id}/sheet.pdf?lang=fr&size=a5")
    assert len(renders) == 2  # another size is another sheet
    path = tmp_path / "a5.pdf"
    path.write_bytes(a5.data)
    info = subprocess.run(["pdfinfo", str(path)], capture_output=True, check=True,
                          text=True).stdout
    assert "(A5)" in info and re.search(r"^Pages:\s+1$", info, re.M)
    conn = db.connect(app.config["DATABASE"])
    prints = [r for r in audit.entries(conn) if r["action"] == "sheet_print"]
    conn.close()
    assert len(prints) == 3 and {r["record_id"] for r in prints} == {case_id}


@pytest.mark.parametrize("url", [
    "http://example.com/static/css/sheet.css",
    "https://sheet.invalid/static/css/sheet.css",
    "file:///etc/passwd",
    "http://sheet.invalid/static/../pyproject.toml",
    "http://sheet.invalid/static/%2e%2e/pyproject.toml",
    "http://sheet.invalid/api/v1/cases",
    "data:text/css,body{}",
])
def test_the_pdf_renderer_fetches_only_local_static_files(app, url):
    with pytest.raises(pdf.RefusedURL):
        pdf.static_path(url, app.static_folder)


def test_the_pdf_renderer_finds_a_static_file(app):
    path = pdf.static_path("http://sheet.invalid/static/css/sheet.css", app.static_folder)
    assert path.name == "sheet.css"


def test_the_pdf_cache_keeps_only_the_newest_entries():
    cache = pdf.PdfCache(max_items=2)
    for key in ("a", "b", "c"):
        cache.get_or_render((key,), lambda k=key: k.encode())
    assert cache.get_or_render(("c",), lambda: b"new") == (b"c", True)
    assert cache.get_or_render(("a",), lambda: b"new") == (b"new", False)


def test_weasyprint_is_not_imported_by_the_app_start():
    code = ("import sys; from clinic_app import create_app; create_app({'TESTING': True, "
            "'SECRET_KEY': 'x', 'DATABASE': ':memory:'}); print('weasyprint' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True,
                         text=True)
    assert out.stdout.strip() == "False", out.stderr
