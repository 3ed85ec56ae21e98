"""Text templates and volume rounding shared by every part of the core.

Templates live in RULES; ``{name}`` placeholders are filled in one left-to-right pass (a value
that itself contains braces is never re-read), the same as ``String.replace`` with a global
regex in the JavaScript engine.
"""

from __future__ import annotations

import math
import re

from .rulebook import RULES

_PLACEHOLDER = re.compile(r"\{([a-z0-9_]+)\}")


def round_volume(ml: float) -> int:
    """Round a volume half-up to RULES["volume_rounding_ml"] (``floor(x / p + 0.5) * p``)."""
    p = RULES["volume_rounding_ml"]["value"]
    return math.floor(ml / p + 0.5) * p


def fmt(value: object) -> str:
    """Format a value for a text the way JavaScript's ``String(value)`` does for our values."""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    if isinstance(value, float):
        return repr(value)
    return str(value)


def render(template: str, params: dict) -> str:
    """Fill ``{name}`` placeholders; a missing parameter is a programming error."""
    return _PLACEHOLDER.sub(lambda m: fmt(params[m.group(1)]), template)


def text_entry(kind: str, code: str) -> dict:
    """The RULES entry of an action or caution text (kind is "actions" or "cautions")."""
    return RULES[kind]["texts"][code]


def ordered(kind: str, items: dict[str, dict]) -> list[dict]:
    """Render collected {code: params} items in the RULES order of that kind."""
    out = []
    for code in RULES[kind]["order"]:
        if code in items:
            out.append({"code": code, "text": render(text_entry(kind, code)["text"], items[code])})
    return out


def facility(name: str, phone: str) -> str:
    """The " to <facility> (phone ...)" suffix of referral texts; empty when not set."""
    texts = RULES["facility_texts"]
    suffix = ""
    if name:
        suffix += render(texts["name"], {"name": name})
    if phone:
        suffix += render(texts["phone"], {"phone": phone})
    return suffix
