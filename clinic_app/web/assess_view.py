"""The result screen's words and numbers, shared by the server page and the phone's script.

``words()`` is sent to the page as JSON; static/js/pages/assess_view.js applies the same
templates with the same arithmetic, so the two renderings cannot say different things
(a browser test compares them). Clinical numbers come from the rulebook only.
"""

from __future__ import annotations

import math
import re

from clinic_app.clinical.rulebook import RULES
from clinic_app.i18n import _
from clinic_app.i18n_rules import localize, rule_texts

_SLOT = re.compile(r"%\((\w+)\)s")


def fill(template: str, **params) -> str:
    """Put the params into a ``%(name)s`` template (the JS side does the same)."""
    return _SLOT.sub(lambda m: num(params[m.group(1)]), template)


def num(value) -> str:
    """Numbers as the JS String() spells them: 2 not 2.0, 0.75 stays 0.75."""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value)


def words() -> dict:
    """Every text of the result screen, translated, with %(name)s slots; ``rule_texts`` maps
    the rulebook's English action and caution templates to their translations."""
    return {
        "rule_texts": rule_texts(_),
        "severity_none": _("No dehydration"), "severity_some": _("Some dehydration"),
        "severity_severe": _("Severe dehydration"),
        "plan_A": _("Plan A: treat at home"), "plan_B": _("Plan B: ORS in the clinic"),
        "plan_C": _("Plan C: severe dehydration, treat quickly"),
        "plan_SAM": _("Malnutrition rehydration protocol (not Plan B or C)"),
        "ors_total": _("ORS: %(total)s ml over %(hours)s hours (table %(low)s-%(high)s ml)"),
        "ors_range": _("ORS: %(low)s-%(high)s ml over %(hours)s hours"),
        "ors_total_only": _("ORS: %(total)s ml over %(hours)s hours"),
        "hour": _("Hour %(n)s"), "ml": _("%(ml)s ml"),
        "cups": _("cups: %(cups)s"), "spoons": _("teaspoons: %(n)s"),
        "cup_size": _("One cup = %(cup_ml)s ml"),
        "per_stool": _("After each loose stool: %(low)s-%(high)s ml of ORS"),
        "per_stool_any": _("After each loose stool: as much ORS as wanted"),
        "zinc": _("Zinc: %(mg)s mg once a day for %(min)s-%(max)s days"),
        "zinc_fixed": _("Zinc: %(mg)s mg once a day for %(days)s days"),
        "refer_urgent": _("Refer urgently"), "refer_routine": _("Refer"),
        "refer_none": _("No referral needed"),
        "facility": _("%(name)s, phone %(phone)s"),
    }


def build_input(data: dict) -> dict:
    """The assess input from the form's fields (static/js/pages/assess_view.js mirrors it)."""
    unit = data.get("age_unit") or "months"
    age = float(data["age_value"])
    if unit == "weeks":
        age = age * 7 / RULES["growth_days_per_month"]["value"]
    elif unit == "years":
        age = age * 12
    inputs: dict = {
        "age_months": age,
        "danger_signs": {name: bool(data.get(name)) for name in RULES["danger_signs"]["inputs"]},
        "signs": {name: data[name] for name in ("condition", "eyes", "drinking", "skin_pinch")
                  if data.get(name)},
        "oedema_both_feet": bool(data.get("oedema_both_feet")),
        "blood_in_stool": bool(data.get("blood_in_stool")),
    }
    if data.get("sex"):
        inputs["sex"] = data["sex"]
    if data.get("weight_kg") is not None and not data.get("no_scale"):
        inputs["weight_kg"] = float(data["weight_kg"])
    for name in ("muac_mm", "diarrhoea_days"):
        if data.get(name) is not None:
            inputs[name] = int(data[name])
    if data.get("confirm_implausible_weight"):
        inputs["confirm_implausible_weight"] = True
    return inputs


def cups(ml: float, cup_ml: int) -> float:
    """Cups of the clinic's size, to the nearest quarter cup."""
    return math.floor(ml / cup_ml * 4 + 0.5) / 4


def spoons(ml: float) -> int:
    return math.floor(ml / RULES["teaspoon_ml"]["value"] + 0.5)


def present(result: dict, settings, age_months: float) -> dict:
    """The result screen's texts (the template only places them)."""
    w = words()
    out = {"severity": result["severity"], "severity_text": w["severity_" + result["severity"]],
           "plan_text": w["plan_" + result["plan"]], "ors_text": "", "schedule": [],
           "cup_text": fill(w["cup_size"], cup_ml=settings.cup_ml), "per_stool_text": "",
           "zinc_text": "", "refer_text": w["refer_" + result["refer"]], "facility_text": "",
           "actions": [localize("actions", a, w["rule_texts"]) for a in result.get("actions", [])],
           "cautions": [localize("cautions", c, w["rule_texts"])
                        for c in result.get("cautions", [])]}
    ors = result.get("ors")
    if ors:
        if ors.get("total_ml") is None and ors.get("low_ml") is None:
            pass  # no weight and no table row: the actions say to weigh the child
        elif ors.get("total_ml") is None:
            out["ors_text"] = fill(w["ors_range"], low=ors["low_ml"], high=ors["high_ml"],
                                   hours=ors["hours"])
        elif ors.get("low_ml") is None:  # beyond the table's last row
            out["ors_text"] = fill(w["ors_total_only"], total=ors["total_ml"],
                                   hours=ors["hours"])
        else:
            out["ors_text"] = fill(w["ors_total"], total=ors["total_ml"], hours=ors["hours"],
                                   low=ors["low_ml"], high=ors["high_ml"])
        small = age_months < RULES["spoons_max_age_months"]["value"]
        for hour, ml in enumerate(ors.get("hourly_ml") or [], start=1):
            out["schedule"].append({
                "hour": fill(w["hour"], n=hour), "ml": fill(w["ml"], ml=ml),
                "cups": fill(w["cups"], cups=cups(ml, settings.cup_ml)),
                "spoons": fill(w["spoons"], n=spoons(ml)) if small else ""})
    per_stool = result.get("per_stool_ml")
    if per_stool:
        out["per_stool_text"] = (w["per_stool_any"] if per_stool.get("as_much_as_wanted") else
                                 fill(w["per_stool"], low=per_stool["low_ml"],
                                      high=per_stool["high_ml"]))
    zinc = result.get("zinc")
    if zinc:
        # A clinic that gives a fixed number of days sees "for 10 days", not "for 10-10 days".
        if zinc["days_min"] == zinc["days_max"]:
            out["zinc_text"] = fill(w["zinc_fixed"], mg=zinc["mg_per_day"],
                                    days=zinc["days_min"])
        else:
            out["zinc_text"] = fill(w["zinc"], mg=zinc["mg_per_day"], min=zinc["days_min"],
                                    max=zinc["days_max"])
    if result["refer"] != "none" and settings.referral_facility_name:
        out["facility_text"] = fill(w["facility"], name=settings.referral_facility_name,
                                    phone=settings.referral_facility_phone or "-")
    return out
