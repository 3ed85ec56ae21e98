"""Input validation: an interpreter of RULES["input_fields"], one message per bad field.

Field errors are keyed by the field's path (``weight_kg``, ``signs.eyes``, ``context.ng_trained``).
Optional fields may be absent or null. Booleans must be JSON booleans and numbers JSON
numbers (never strings); an "integer" is any number with no fractional part, as in JavaScript.
"""

from __future__ import annotations

import math

from . import growth, scores
from .messages import fmt, render
from .rulebook import RULES
from .types import AssessInput, AssessmentInputError

_SCALAR_FIELDS = ("weight_kg", "weight_estimated", "sex", "height_cm", "height_measured_lying",
                  "muac_mm", "oedema_both_feet", "diarrhoea_days", "blood_in_stool",
                  "sodium_mmol_l", "confirm_implausible_weight")


def _message(key: str, spec: dict, **params) -> str:
    unit = spec.get("unit")
    params = {"label": spec["label"], "unit": f" {unit}" if unit else "", **params}
    return render(RULES["input_messages"]["texts"][key], params)


def _is_number(value: object) -> bool:
    if not isinstance(value, int | float) or isinstance(value, bool):
        return False
    try:
        return math.isfinite(value)
    except OverflowError:   # an integer beyond float range (JavaScript reads it as Infinity)
        return False


def _type_error(spec: dict, value: object) -> str | None:
    kind = spec["type"]
    if kind == "number" and not _is_number(value):
        return _message("number", spec)
    if kind == "integer" and not (_is_number(value) and float(value).is_integer()):
        return _message("integer", spec)
    if kind == "boolean" and not isinstance(value, bool):
        return _message("boolean", spec)
    if kind == "choice" and value not in spec["choices"]:
        return _message("choice", spec, choices=", ".join(spec["choices"]))
    if kind == "object" and not isinstance(value, dict):
        return _message("object", spec)
    return None


def _range_error(spec: dict, value: float) -> str | None:
    low, high, high_excl = spec.get("min"), spec.get("max"), spec.get("max_exclusive")
    too_low = low is not None and value < low
    if high_excl is not None and (too_low or value >= high_excl):
        return _message("range_exclusive", spec, min=low, max=high_excl)
    if high is not None and (too_low or value > high):
        return _message("range", spec, min=low, max=high)
    if high is None and high_excl is None and too_low:
        return _message("min", spec, min=low)
    return None


def _check_fields(specs: list, data: dict, prefix: str, age: float | None,
                  errors: dict, out: dict) -> None:
    for spec in specs:
        path = prefix + spec["name"]
        value = data.get(spec["name"])
        if value is None:
            needed_from = spec.get("required_from_age_months")
            if spec.get("required") or (needed_from is not None and age is not None
                                        and age >= needed_from):
                errors[path] = _message("required", spec)
            continue
        problem = _type_error(spec, value)
        if problem is None and spec["type"] in ("number", "integer"):
            problem = _range_error(spec, value)
        if problem is not None:
            errors[path] = problem
        elif spec["type"] == "object":
            out[spec["name"]] = {}
            _unknown_keys(value, spec["fields"], (), path + ".", errors)
            _check_fields(spec["fields"], value, path + ".", age, errors, out[spec["name"]])
        elif spec["type"] == "integer":
            out[spec["name"]] = int(value)
        else:
            out[spec["name"]] = value


def _unknown_keys(data: dict, specs: list, allowed: tuple, prefix: str, errors: dict) -> None:
    known = {spec["name"] for spec in specs}
    for key in sorted(data):
        if key not in known and key not in allowed:
            errors[prefix + key] = RULES["input_messages"]["texts"]["unknown"]


def _valid_age(inputs: dict) -> float | None:
    age = inputs.get("age_months")
    spec = RULES["input_fields"]["fields"][0]
    if _is_number(age) and _range_error(spec, age) is None:
        return age
    return None


def validate(inputs: object) -> AssessInput:
    """Check the raw JSON input of an assessment; raise AssessmentInputError("invalid_input")."""
    if not isinstance(inputs, dict):
        raise AssessmentInputError(
            "invalid_input", {"body": RULES["input_messages"]["texts"]["not_object"]})
    specs = RULES["input_fields"]["fields"]
    errors: dict[str, str] = {}
    out: dict = {}
    age = _valid_age(inputs)
    _unknown_keys(inputs, specs, ("score_items",), "", errors)
    _check_fields(specs, inputs, "", age, errors, out)
    errors.update(scores.score_item_errors(inputs))
    if errors:
        raise AssessmentInputError("invalid_input", errors)
    signs = dict(out["signs"])
    if age < RULES["young_infant_signs"]["max_age_months_exclusive"]:
        signs.pop("drinking", None)   # thirst is not assessed in young infants
    danger = out.get("danger_signs", {})
    return AssessInput(
        age_months=out["age_months"],
        signs=tuple(sorted(signs.items())),
        danger_signs=tuple(name for name in RULES["danger_signs"]["inputs"] if danger.get(name)),
        context=tuple(sorted(out.get("context", {}).items())),
        raw=inputs,
        **{name: out[name] for name in _SCALAR_FIELDS if name in out},
    )


def _broad_band(age_months: float) -> dict:
    for row in RULES["implausible_weight_broad_bands"]["rows"]:
        if row["max_age_months"] is None or age_months < row["max_age_months"]:
            return row
    raise AssertionError("the last broad band is open-ended")


def check_weight_plausible(inp: AssessInput) -> None:
    """Raise AssessmentInputError("implausible_weight") for a weight implausible for the age.

    WHO weight-for-age flag (WAZ < -6 or > +5) inside the WHO table; with sex unknown the
    weight is implausible only if it is implausible for both sexes. Beyond the table a broad
    band of our own (common practice, no source). Skipped when the user confirmed the weight.
    """
    if inp.weight_kg is None or inp.confirm_implausible_weight:
        return
    if not weight_is_implausible(inp.sex, inp.age_months, inp.weight_kg):
        return
    bounds = _plausible_bounds(inp.sex, inp.age_months)
    texts = RULES["input_messages"]["texts"]
    shown = "" if bounds is None else render(texts["implausible_range"],
                                             {"low_kg": bounds[0], "high_kg": bounds[1]})
    raise AssessmentInputError("implausible_weight", {"weight_kg": render(
        texts["implausible_weight"], {"weight_kg": fmt(inp.weight_kg), "range": shown})})


def weight_is_implausible(sex: str | None, age_months: float, weight_kg: float) -> bool:
    """True when the weight is outside the plausible range for the age (see above)."""
    sexes = [sex] if sex is not None else list(growth.SEXES)
    verdicts = [growth.weight_plausible(s, age_months, weight_kg) for s in sexes]
    if all(v is None for v in verdicts):
        band = _broad_band(age_months)
        return not band["min_kg"] <= weight_kg <= band["max_kg"]
    return not any(v is not False for v in verdicts)


def _plausible_bounds(sex: str | None, age_months: float) -> tuple[int, int] | None:
    # Rounded outward to whole kilograms, for the message only.
    bounds = growth.plausible_weight_range_kg(sex or growth.SEXES[0], age_months)
    if bounds is None:
        band = _broad_band(age_months)
        return band["min_kg"], band["max_kg"]
    if sex is None:
        return None
    return math.floor(bounds[0]), math.ceil(bounds[1])
