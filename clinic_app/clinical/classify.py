"""Classification: dehydration severity, danger signs, malnutrition, cholera and the rest.

Each function reads its thresholds from RULES; band edges are half-open as in the reference
(``age < max_age_months``, ``value < below``).
"""

from __future__ import annotations

from .rulebook import RULES
from .types import AssessInput

SEVERITIES = ("none", "some", "severe")


def is_young_infant(age_months: float) -> bool:
    """Under 2 months: the young-infant signs apply."""
    return age_months < RULES["young_infant_signs"]["max_age_months_exclusive"]


def severity(signs: dict, age_months: float) -> str:
    """WHO/IMCI two-or-more-signs rule; column-C signs also count towards "some".

    ``signs`` maps row names to entered values. Young infants use the young-infant rows
    (no thirst row).
    """
    rule = RULES["dehydration_signs"]
    rows = RULES["young_infant_signs"]["rows"] if is_young_infant(age_months) else rule["rows"]
    levels = [row["levels"][signs[row["field"]]] for row in rows]
    if len([x for x in levels if x >= rule["severe_level"]]) >= rule["min_signs"]:
        return "severe"
    if len([x for x in levels if x >= rule["some_level"]]) >= rule["min_signs"]:
        return "some"
    return "none"


def danger_signs(inp: AssessInput) -> list[str]:
    """General danger signs present: the entered ones, then those implied by the signs."""
    found = list(inp.danger_signs)
    for item in RULES["danger_signs"]["from_signs"]:
        if inp.sign(item["field"]) == item["value"]:
            found.append(item["field"] + ":" + item["value"])
    return found


def in_malnutrition_ages(age_months: float) -> bool:
    """6 up to 60 months, where the MUAC/WHZ/oedema criteria apply."""
    rule = RULES["acute_malnutrition"]
    return rule["min_age_months"] <= age_months < rule["max_age_months_exclusive"]


def malnutrition(inp: AssessInput, wflh_z: float | None) -> str | None:
    """"sam", "mam" or None (6-59 months only). Any one SAM criterion suffices."""
    if not in_malnutrition_ages(inp.age_months):
        return None
    rule = RULES["acute_malnutrition"]
    muac = inp.muac_mm
    if (inp.oedema_both_feet
            or (muac is not None and muac < rule["muac_severe_below_mm"])
            or (wflh_z is not None and wflh_z < rule["wflh_severe_below_z"])):
        return "sam"
    if ((muac is not None and muac < rule["muac_moderate_below_mm"])
            or (wflh_z is not None and wflh_z < rule["wflh_moderate_below_z"])):
        return "mam"
    return None


def is_persistent(inp: AssessInput) -> bool:
    """Diarrhoea for 14 days or more."""
    days = inp.diarrhoea_days
    return days is not None and days >= RULES["persistent_diarrhoea"]["min_days"]


def _matches(inp: AssessInput, item: dict) -> bool:
    if item["group"] == "signs":
        return inp.sign(item["field"]) == item["value"]
    return (item["field"] in inp.danger_signs) == item["value"]


def cholera_severe_dehydration(inp: AssessInput) -> bool:
    """GTFCC severe dehydration: one danger sign, or two of the other signs."""
    rule = RULES["cholera"]
    if any(_matches(inp, item) for item in rule["severe_any_of"]):
        return True
    return len([i for i in rule["severe_two_of"] if _matches(inp, i)]) >= rule["severe_min_count"]


def suspected_cholera(inp: AssessInput, outbreak: bool) -> bool:
    """GTFCC suspected case: acute watery diarrhoea and (outbreak, or >= 2 y with severe)."""
    rule = RULES["cholera"]
    watery = not inp.blood_in_stool
    acute = inp.diarrhoea_days is None or inp.diarrhoea_days < rule["acute_max_days_exclusive"]
    if not (watery and acute):
        return False
    return outbreak or (inp.age_months >= rule["min_age_months"]
                        and cholera_severe_dehydration(inp))
