"""Published dehydration scores: CDS, Gorelick (10 and 4 items) and DHAKA.

Scores inform; they never override the WHO classification. A scale is computed only when all
of its items were entered. Items arrive in the assessment input under ``score_items``, one
object per scale, each item named after the scale's own item and given one finding::

    "score_items": {
      "cds": {"general_appearance": "normal" | "thirsty_restless_or_lethargic_but_irritable"
                                    | "drowsy_limp_cold_sweaty_or_comatose",
              "eyes": "normal" | "slightly_sunken" | "very_sunken",
              "mucous_membranes": "moist" | "sticky" | "dry",
              "tears": "tears" | "decreased" | "absent"},
      "gorelick": {"general_appearance": "normal" | "restless_lethargic_or_unconscious",
                   "capillary_refill": "up_to_2_s" | "over_2_s",
                   "tears": "present" | "absent",
                   "mucous_membranes": "moist" | "dry",
                   "eyes": "normal" | "sunken",
                   "skin_elasticity": "normal" | "decreased",
                   "respirations": "normal" | "deep",
                   "radial_pulse": "normal" | "weak_or_impalpable",
                   "heart_rate": "up_to_150" | "over_150",
                   "urine_output": "normal" | "decreased_or_absent"},
      "dhaka": {"general_appearance": "normal" | "restless_or_irritable" | "lethargic_or_unconscious",
                "respirations": "normal" | "deep",
                "skin_pinch": "normal" | "slow" | "very_slow",
                "tears": "normal" | "decreased" | "absent"}
    }

The 4-item Gorelick score needs only general_appearance, capillary_refill, tears and
mucous_membranes; the 10-item score needs all ten. Points, bands and validated ages are in
``RULES["score_cds" | "score_gorelick" | "score_dhaka"]``; findings are listed there from
least to most abnormal.

Each computed score: ``{"score", "max_score", "band", "source", "warning", "status",
"unconfirmed", "caution"}``. ``warning`` is a sentence when the age is outside the scale's
validated range, else None. ``status`` is "unconfirmed" when any number used (points, bands,
age range) is marked unconfirmed in the rulebook; ``unconfirmed`` lists which, and
``caution`` says so in a sentence.
"""

from __future__ import annotations

from .rulebook import RULES

# result key -> (rulebook key, input object, which items, bands key)
SCALES: dict[str, tuple[str, str, str | None, str]] = {
    "cds": ("score_cds", "cds", None, "bands"),
    "gorelick_10": ("score_gorelick", "gorelick", None, "bands_10"),
    "gorelick_4": ("score_gorelick", "gorelick", "four_item_names", "bands_4"),
    "dhaka": ("score_dhaka", "dhaka", None, "bands"),
}
INPUT_SCALES: dict[str, str] = {"cds": "score_cds", "gorelick": "score_gorelick", "dhaka": "score_dhaka"}


def _text(code: str, **values: str) -> str:
    return RULES["score_messages"]["texts"][code].format(**values)


def item_points(input_scale: str) -> dict[str, dict[str, int]]:
    """``{item: {finding: points}}`` of one input scale ("cds", "gorelick" or "dhaka")."""
    return RULES[INPUT_SCALES[input_scale]]["items"]["points"]


def score_item_errors(inputs: dict) -> dict[str, str]:
    """Field errors in ``inputs["score_items"]``, keyed ``score_items.<scale>[.<item>]``."""
    given = inputs.get("score_items")
    if given is None:
        return {}
    if not isinstance(given, dict):
        return {"score_items": _text("not_object")}
    errors: dict[str, str] = {}
    for scale, items in given.items():
        key = f"score_items.{scale}"
        if scale not in INPUT_SCALES:
            errors[key] = _text("unknown_scale", choices=", ".join(INPUT_SCALES))
            continue
        if not isinstance(items, dict):
            errors[key] = _text("not_object")
            continue
        points = item_points(scale)
        name = RULES[INPUT_SCALES[scale]]["name"]
        for item, finding in items.items():
            if item not in points:
                errors[f"{key}.{item}"] = _text("unknown_item", name=name)
            elif finding is not None and (not isinstance(finding, str)
                                          or finding not in points[item]):
                errors[f"{key}.{item}"] = _text("invalid_item", choices=", ".join(points[item]))
    return errors


def _band(rows: list[dict], score: int) -> str:
    for row in rows:
        if row["min"] <= score <= row["max"]:
            return row["band"]
    raise ValueError(f"score {score} is outside every band")


def _one(result_key: str, entered: dict, age_months: float) -> dict | None:
    rule_key, _input, subset_key, bands_key = SCALES[result_key]
    rule = RULES[rule_key]
    points = rule["items"]["points"]
    names = rule[subset_key]["value"] if subset_key else list(points)
    if any(entered.get(name) is None for name in names):
        return None
    score = sum(points[name][entered[name]] for name in names)
    bands = rule[bands_key]
    ages = rule["age_months"]
    unconfirmed = [part for part, entry in (("points", rule["items"]), ("bands", bands),
                                            ("age_range", ages))
                   if entry.get("status") == "unconfirmed"]
    in_range = ages["min"] <= age_months < ages["below"]
    return {
        "score": score,
        "max_score": sum(max(points[name].values()) for name in names),
        "band": _band(bands["rows"], score),
        "source": rule["source"],
        "warning": None if in_range else _text("outside_age", name=rule["name"], ages=ages["text"]),
        "status": "unconfirmed" if unconfirmed else "confirmed",
        "unconfirmed": unconfirmed,
        "caution": (_text("unconfirmed", name=rule["name"], parts=", ".join(unconfirmed).replace("_", " "))
                    if unconfirmed else None),
    }


def compute_scores(inputs: dict, age_months: float) -> dict:
    """The scores whose items were all entered, keyed cds / gorelick_10 / gorelick_4 / dhaka.

    ``inputs`` is the assessment input; items are read from ``inputs["score_items"]``.
    Raises ValueError when an item is unknown or has a finding the scale does not define
    (``score_item_errors`` gives the per-field messages for a 422 answer).
    """
    errors = score_item_errors(inputs)
    if errors:
        raise ValueError(errors)
    given = inputs.get("score_items") or {}
    results = {}
    for result_key, (_rule, input_scale, _subset, _bands) in SCALES.items():
        result = _one(result_key, given.get(input_scale) or {}, age_months)
        if result is not None:
            results[result_key] = result
    return results
