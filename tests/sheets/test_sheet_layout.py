"""The sheet's printed layout: every step and danger sign sits inside its box, none overlap.

A page count alone would not notice items escaping their box (the list items are floats), so
the boxes WeasyPrint lays out for the PDF are checked here, left to right and right to left.
"""

from __future__ import annotations

import pytest

from clinic_app import pdf

from .helpers import quick_sheet

SLACK = 0.01  # px: layout arithmetic rounding


def boxes_of(box, tag: str, css_class: str):
    """Every laid-out box of ``<tag class="... css_class ...">`` under ``box``."""
    element = getattr(box, "element", None)
    if (getattr(box, "element_tag", None) == tag and element is not None
            and css_class in (element.get("class") or "").split()):
        yield box
    for child in getattr(box, "children", ()):
        yield from boxes_of(child, tag, css_class)


def items(box):
    return [child for child in box.children if getattr(child, "element_tag", None) == "li"]


def inside(item, box) -> bool:
    return (box.content_box_x() - SLACK <= item.position_x
            and item.position_x + item.margin_width() <= box.content_box_x() + box.width + SLACK
            and box.content_box_y() - SLACK <= item.position_y
            and item.position_y + item.margin_height()
            <= box.content_box_y() + box.height + SLACK)


def overlap(a, b) -> bool:
    return (a.position_x + a.margin_width() > b.position_x + SLACK
            and b.position_x + b.margin_width() > a.position_x + SLACK
            and a.position_y + a.margin_height() > b.position_y + SLACK
            and b.position_y + b.margin_height() > a.position_y + SLACK)


@pytest.mark.parametrize("lang", ["en", "ar"])
def test_steps_and_danger_signs_stay_inside_their_boxes_without_overlapping(app, client, as_user,
                                                                           lang):
    import weasyprint

    page_html = quick_sheet(client, as_user("nurse"), lang).get_data(as_text=True)
    document = weasyprint.HTML(string=page_html, base_url=pdf.BASE_URL,
                               url_fetcher=pdf.local_fetcher(app.static_folder)).render()
    assert len(document.pages) == 1
    page = document.pages[0]._page_box
    for section_class, list_tag, list_class, per_row in (("mix", "ol", "steps", [2, 2]),
                                                          ("danger", "ul", "signs", [3, 3, 1])):
        [section] = boxes_of(page, "section", section_class)
        [listed] = boxes_of(section, list_tag, list_class)
        found = items(listed)
        assert len(found) == sum(per_row)
        assert all(inside(item, listed) and inside(item, section) for item in found)
        assert not any(overlap(a, b) for i, a in enumerate(found) for b in found[i + 1:])
        # Read in rows, in order, each row beginning at the start of the line.
        rows: dict[float, list] = {}
        for item in found:
            rows.setdefault(round(item.position_y, 3), []).append(item)
        assert [len(row) for _, row in sorted(rows.items())] == per_row
        for _, row in sorted(rows.items()):
            first = row[0]
            if lang == "ar":
                assert first.position_x + first.margin_width() == pytest.approx(
                    listed.content_box_x() + listed.width)
                assert [i.position_x for i in row] == sorted((i.position_x for i in row),
                                                             reverse=True)
            else:
                assert first.position_x == pytest.approx(listed.content_box_x())
                assert [i.position_x for i in row] == sorted(i.position_x for i in row)


def text_boxes(box):
    if hasattr(box, "text"):
        yield box
    for child in getattr(box, "children", ()):
        yield from text_boxes(child)


@pytest.mark.parametrize("lang", ["en", "hi", "ar"])
def test_each_day_fills_one_cell_of_the_squares_background(app, client, as_user, lang):
    """The tick squares are a background tile of 6ch; the days' text must be exactly 6ch a
    day (digits and figure spaces of equal width), or squares and numbers drift apart."""
    import weasyprint

    page_html = quick_sheet(client, as_user("nurse"), lang).get_data(as_text=True)
    document = weasyprint.HTML(string=page_html, base_url=pdf.BASE_URL,
                               url_fetcher=pdf.local_fetcher(app.static_folder)).render()
    page = document.pages[0]._page_box
    # (A laid-out line can list one box twice: keep one per place.)
    runs = list({(box.element.get("class"), box.position_x, box.position_y): box
                 for box in boxes_of(page, "span", "days")}.values())
    assert [r.element.get("class") for r in runs] == ["days", "days extra"]  # S10: 10, then 14
    for run in runs:
        cells = [c for c in "".join(t.text for t in text_boxes(run)).split("\u200b") if c]
        ch = 0.572 * run.style["font_size"]  # Noto Sans: "0" is 572 units of 1000
        width = sum(t.width for t in text_boxes(run))
        assert width == pytest.approx(len(cells) * 6 * ch, abs=0.05), (lang, cells)
    required, extra = runs
    # Left to right, or right to left in Arabic: the extra days come after the required ones.
    if lang == "ar":
        assert extra.position_x + extra.margin_width() <= required.position_x + 0.01
    else:
        assert required.position_x + required.margin_width() <= extra.position_x + 0.01

