"""Translating the rulebook's action and caution texts for the screen.

Both engines return the English texts of the rulebook (the API contract and the parity test
compare them). The screens show them in the user's language: the English template of the
item's code is matched against the engine's text to recover the values in it, and the values
are put into the translated template. A text that does not match its template (or has no
translation) is shown as it came, in English, so nothing is ever lost.

``extract`` is the Babel extractor that puts these templates into messages.pot.
static/js/pages/assess_view.js applies the same matching on the phone.
"""

from __future__ import annotations

import re

from clinic_app.clinical.rulebook import RULES

_PLACEHOLDER = re.compile(r"\{([a-z0-9_]+)\}")
KINDS = ("actions", "cautions")


def _templates() -> list[tuple[str, str]]:
    """(template, where) for every text shown on screen: actions, cautions, facility, labels."""
    found = [(entry["text"], f"rulebook {kind}.{code}")
             for kind in KINDS for code, entry in RULES[kind]["texts"].items()]
    found += [(RULES["facility_texts"][part], f"rulebook facility_texts.{part}")
              for part in ("name", "phone")]

    def labels(node, path):
        if isinstance(node, dict):
            if node.get("status") == "unconfirmed" and isinstance(node.get("label"), str):
                found.append((node["label"], f"rulebook {path} (unconfirmed rule label)"))
            for key, value in node.items():
                labels(value, f"{path}.{key}" if path else key)
        elif isinstance(node, list):
            for value in node:
                labels(value, path)

    labels(RULES, "")
    return found


def extract(fileobj, keywords, comment_tags, options):
    """Babel extractor (entry point ``rulebook``): the rulebook's screen texts as msgids."""
    seen = set()
    for text, where in _templates():
        if text not in seen:
            seen.add(text)
            yield 1, None, text, [f"I18N: {where}; keep every {{name}} placeholder as it is"]


def rule_texts(gettext) -> dict[str, str]:
    """{English template: translation} for the current language (only those translated)."""
    out = {}
    for text, _where in _templates():
        translated = gettext(text)
        if translated != text:
            out[text] = translated
    return out


def _pattern(template: str) -> re.Pattern:
    parts, pos, names = [], 0, set()
    for match in _PLACEHOLDER.finditer(template):
        parts.append(re.escape(template[pos:match.start()]))
        name = match.group(1)
        parts.append(f"(?P={name})" if name in names else f"(?P<{name}>.*?)")
        names.add(name)
        pos = match.end()
    parts.append(re.escape(template[pos:]))
    return re.compile("^" + "".join(parts) + "$", re.S)


def _fill(template: str, params: dict) -> str:
    return _PLACEHOLDER.sub(lambda m: params[m.group(1)], template)


def _facility(value: str, translations: dict[str, str]) -> str:
    """Translate the " to <facility> (phone ...)" suffix of referral texts."""
    name_t, phone_t = RULES["facility_texts"]["name"], RULES["facility_texts"]["phone"]
    for template in (name_t + phone_t, name_t, phone_t):
        found = _pattern(template).match(value)
        if found:
            translated = "".join(translations.get(t, t) for t in (name_t, phone_t)
                                 if _PLACEHOLDER.search(t).group(1) in found.groupdict())
            return _fill(translated, found.groupdict())
    return value


def localize(kind: str, item: dict, translations: dict[str, str]) -> str:
    """The text of one action or caution in the screen's language."""
    entry = RULES[kind]["texts"].get(item.get("code"))
    text = item.get("text", "")
    if entry is None or entry["text"] not in translations:
        return text
    found = _pattern(entry["text"]).match(text)
    if found is None:
        return text
    params = {name: translations.get(value, value) for name, value in found.groupdict().items()}
    if "facility" in params:
        params["facility"] = _facility(found.group("facility"), translations)
    try:
        return _fill(translations[entry["text"]], params)
    except KeyError:  # a translation naming a value the English text does not have
        return text
