"""The PDF adapter's shared pictogram drawings: a repeat render equals plain WeasyPrint's."""

from __future__ import annotations

import pytest

from clinic_app import pdf

PLAIN_SVG = ('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 64 64" fill="none" '
             'stroke="#1a1a1a" stroke-width="3"><path d="M12 18h34l-4 36H16z"/>'
             '<circle cx="32" cy="32" r="6" fill="#7fb2e5"/>'
             '<path d="M15 30h30" stroke-dasharray="3 4"/></svg>')
# Half-transparent, clipped and lettered: drawn with a group, a clip and a font, which a
# recorded list of operators could not carry into another PDF.
FANCY_SVG = ('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 64 64">'
             '<defs><clipPath id="c"><rect width="32" height="64"/></clipPath></defs>'
             '<g opacity="0.5"><circle cx="32" cy="32" r="20" fill="#111"/></g>'
             '<rect width="64" height="64" fill="#7fb2e5" clip-path="url(#c)"/>'
             '<text x="8" y="40" font-size="20">A</text></svg>')
PAGE = ('<!doctype html><html><body><p>Cup <img src="/static/plain.svg" style="width:8mm"> '
        'and <img src="/static/plain.svg" style="width:12mm"> '
        '<img src="/static/fancy.svg" style="width:10mm"></p>'
        '<p><img src="/static/plain.svg" style="width:8mm"> '
        '<img src="/static/fancy.svg" style="width:10mm"></p></body></html>')


def plain_weasyprint(html: str, static_root) -> bytes:
    import weasyprint

    return weasyprint.HTML(string=html, base_url=pdf.BASE_URL,
                           url_fetcher=pdf.local_fetcher(static_root)).write_pdf()


@pytest.fixture
def static_root(tmp_path):
    (tmp_path / "plain.svg").write_text(PLAIN_SVG)
    (tmp_path / "fancy.svg").write_text(FANCY_SVG)
    yield tmp_path
    pdf._shared.pop(str(tmp_path), None)


def test_repeat_renders_equal_plain_weasyprint_byte_for_byte(static_root):
    expected = plain_weasyprint(PAGE, static_root)
    first = pdf.html_to_pdf(PAGE, static_root)   # draws the pictograms and keeps them
    second = pdf.html_to_pdf(PAGE, static_root)  # replays what it kept
    assert first == second == expected


def test_only_plain_pictograms_are_replayed(static_root):
    pdf.html_to_pdf(PAGE, static_root)
    images = pdf._state(str(static_root)).images
    kept = {url.rsplit("/", 1)[-1]: list(image._takes.values())
            for url, image in images.items()}
    assert len(kept["plain.svg"]) == 2 and all(kept["plain.svg"])  # two sizes, both kept
    assert kept["fancy.svg"] == [None]  # drawn by WeasyPrint every time
