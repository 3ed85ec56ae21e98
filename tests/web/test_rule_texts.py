"""The rulebook's action and caution texts are shown in the user's language on the result
screen; the engines keep returning English (clinic_app/i18n_rules.py)."""

from __future__ import annotations

import json
from pathlib import Path

from clinic_app.clinical.rulebook import RULES
from clinic_app.i18n_rules import extract, localize

VECTORS = json.loads((Path(__file__).resolve().parents[1] / "vectors" / "assessments.json")
                     .read_text())
CASES = VECTORS if isinstance(VECTORS, list) else VECTORS["cases"]


def marked() -> dict[str, str]:
    return {entry["text"]: f"[[{entry['text']}]]"
            for kind in ("actions", "cautions") for entry in RULES[kind]["texts"].values()}


def test_every_action_and_caution_of_every_vector_is_matched_and_refilled():
    translations, checked = marked(), 0
    for case in CASES:
        for kind in ("actions", "cautions"):
            for item in case["expected"].get(kind, []):
                assert localize(kind, item, translations) == f"[[{item['text']}]]", case["name"]
                checked += 1
    assert checked > 500


def test_the_facility_suffix_is_translated_with_the_text():
    template = RULES["actions"]["texts"]["plan_c_refer_iv_facility"]["text"]
    translations = {template: "Rufaa HARAKA{facility}.",
                    RULES["facility_texts"]["name"]: " kwa {name}",
                    RULES["facility_texts"]["phone"]: " (simu {phone})"}
    text = template.replace("{facility}", " to Siwelo Hospital (phone +000 1)")
    assert localize("actions", {"code": "plan_c_refer_iv_facility", "text": text},
                    translations) == "Rufaa HARAKA kwa Siwelo Hospital (simu +000 1)."


def test_a_text_that_does_not_match_or_a_broken_translation_stays_in_english():
    template = RULES["cautions"]["texts"]["vomiting"]["text"]
    assert localize("cautions", {"code": "vomiting", "text": "other"},
                    {template: "x {minutes}"}) == "other"
    good = {"code": "vomiting", "text": template.replace("{minutes}", "10")}
    assert localize("cautions", good, {template: "x {seconds}"}) == good["text"]


def test_the_extractor_offers_every_screen_text_to_the_translators():
    msgids = {message for _line, _func, message, _comments in extract(None, [], [], {})}
    for kind in ("actions", "cautions"):
        for entry in RULES[kind]["texts"].values():
            assert entry["text"] in msgids
    assert RULES["facility_texts"]["name"] in msgids


def test_the_result_screen_uses_the_translation(app, monkeypatch):
    from clinic_app.web import assess_view

    template = RULES["cautions"]["texts"]["not_improving"]["text"]
    monkeypatch.setattr(assess_view, "rule_texts", lambda _gettext: {template: "Asipopata nafuu."})
    result = {"severity": "none", "plan": "A", "refer": "none", "ors": None,
              "actions": [], "cautions": [{"code": "not_improving", "text": template}]}
    from clinic_app.clinical.types import ClinicSettings

    with app.test_request_context("/"):
        shown = assess_view.present(result, ClinicSettings(), 18)
    assert shown["cautions"] == ["Asipopata nafuu."]
