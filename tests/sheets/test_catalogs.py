"""The catalogs: every translatable string has an entry, placeholders survive translation,
and the review status is in every header."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from babel.messages.extract import DEFAULT_KEYWORDS, extract_from_dir
from babel.messages.pofile import read_po

from clinic_app.i18n_export import (
    catalog_info,
    catalog_json,
    languages,
    po_path,
    set_status_headers,
)
from clinic_app.i18n_rules import extract as extract_rulebook

ROOT = Path(__file__).resolve().parents[2]
REQUIRED = ("fr", "pt", "es", "sw", "hi", "ar")
# %(name)s for gettext strings, {name} for the rulebook's action and caution templates.
PLACEHOLDER = re.compile(r"%\(\w+\)[sd]|\{[a-z0-9_]+\}")


def source_msgids() -> set[str]:
    keywords = {**DEFAULT_KEYWORDS, "lazy_gettext": None}
    method_map = [("**/templates/**.html", "jinja2"), ("**.py", "python")]
    found = set()
    for _file, _line, message, _comments, _context in extract_from_dir(
            str(ROOT / "clinic_app"), method_map, {}, keywords=keywords):
        found.add(message if isinstance(message, str) else message[0])
    found |= {message for _line, _func, message, _comments in extract_rulebook(None, [], [], {})}
    return found


def read(lang: str):
    with po_path(lang).open("rb") as fh:
        return read_po(fh, locale=lang)


def test_every_required_language_has_a_catalog():
    assert set(REQUIRED) <= set(languages())


@pytest.mark.parametrize("lang", REQUIRED)
def test_every_string_of_the_templates_and_code_has_a_catalog_entry(lang):
    catalog = read(lang)
    absent = sorted(m for m in source_msgids() if m not in catalog)
    assert absent == [], f"run `make translations-update`; missing in {lang}: {absent[:5]}"


@pytest.mark.parametrize("lang", REQUIRED)
def test_translations_keep_every_placeholder(lang):
    for message in read(lang):
        if not message.id or not message.string:
            continue
        source = message.id if isinstance(message.id, str) else message.id[-1]
        forms = [message.string] if isinstance(message.string, str) else message.string
        for form in forms:
            if form:
                assert sorted(PLACEHOLDER.findall(form)) == sorted(PLACEHOLDER.findall(source)), form


@pytest.mark.parametrize("lang", REQUIRED)
def test_a_catalog_marked_complete_has_no_empty_translation(lang):
    info = catalog_info(lang)
    assert info.review_status in ("draft", "reviewed")
    if info.complete:
        empty = [m.id for m in read(lang) if m.id and not all(
            [m.string] if isinstance(m.string, str) else m.string)]
        assert empty == []


def test_the_complete_check_catches_an_empty_translation(tmp_path):
    path = tmp_path / "xx" / "LC_MESSAGES" / "messages.po"
    path.parent.mkdir(parents=True)
    path.write_text('msgid ""\nmsgstr ""\n"Content-Type: text/plain; charset=utf-8\\n"\n\n'
                    'msgid "Zinc"\nmsgstr ""\n', encoding="utf-8")
    set_status_headers(path, {"X-Review-Status": "draft", "X-Translation-Complete": "yes"})
    info = catalog_info("xx", tmp_path)
    assert info.complete and info.draft
    assert catalog_json("xx", tmp_path)["messages"] == {}


@pytest.mark.parametrize("lang", REQUIRED)
def test_the_sheet_and_common_screens_are_translated(lang):
    catalog = read(lang)
    for msgid in ("Home care for your child", "Mix the ORS", "Come back at once if the child:",
                  "Log in", "Wrong user name or password.", "Page not found",
                  "draft translation, to be reviewed by a native-speaking health worker"):
        assert catalog[msgid].string, (lang, msgid)


def test_the_json_catalog_for_the_offline_pages_comes_from_the_po_file():
    data = catalog_json("sw")
    assert data["messages"]["Mix the ORS"] == "Changanya ORS"
    assert data["review_status"] == "draft"
    assert catalog_json("ar")["dir"] == "rtl"
    json.dumps(data)
