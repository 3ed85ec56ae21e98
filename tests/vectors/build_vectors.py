"""Build tests/vectors/assessments.json: golden assessment cases shared with the JS engine.

Run: .venv/bin/python tests/vectors/build_vectors.py

Each case is {"name", "input", "settings" (overrides of ClinicSettings, optional),
"expected"}; "expected" is assess()'s output without "rulebook_version" (a hash of the whole
rulebook, pinned separately), or {"error": {"code", "fields"}} for a 422 case.
The expected outputs were generated, then reviewed by hand: the reasoning for a sample of them
is written out in tests/clinical/test_reviewed_vectors.py. After a deliberate rule change,
rebuild, review the diff, and commit both.
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from clinic_app.clinical import AssessmentInputError, ClinicSettings, assess  # noqa: E402

OUT = Path(__file__).with_name("assessments.json")

WELL = {"condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"}
SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
SEVERE = {"condition": "restless", "eyes": "sunken", "drinking": "poor", "skin_pinch": "very_slow"}
YOUNG_WELL = {"condition": "well", "eyes": "normal", "skin_pinch": "quick"}
YOUNG_SOME = {"condition": "restless", "eyes": "sunken", "skin_pinch": "slow"}
YOUNG_SEVERE = {"condition": "lethargic", "eyes": "sunken", "skin_pinch": "very_slow"}
WEIGHT_FOR_AGE = {1: 4.2, 3: 5.8, 8: 8, 18: 10.5, 30: 12.5, 96: 25, 400: 60}

CASES: list[tuple[str, dict, dict]] = []


def add(name: str, inputs: dict, settings: dict | None = None) -> None:
    CASES.append((name, inputs, settings or {}))


def inp(age, weight=None, signs=None, **extra) -> dict:
    young = isinstance(age, int | float) and age < 2
    out = {"age_months": age, "signs": dict(signs or (YOUNG_WELL if young else WELL))}
    if weight is not None:
        out["weight_kg"] = weight
    out.update(extra)
    return out


def build() -> None:
    # Severity grid across age bands (S05 >=2 signs; S07 young infant).
    for age, weight in WEIGHT_FOR_AGE.items():
        young = age < 2
        grid = {"well": YOUNG_WELL if young else WELL, "some": YOUNG_SOME if young else SOME,
                "severe": YOUNG_SEVERE if young else SEVERE}
        for label, signs in grid.items():
            add(f"S05-grid-{age}m-{label}", inp(age, weight, signs))
    add("S02-C-sign-counts-towards-some", inp(30, 12.5, dict(WELL, condition="lethargic", skin_pinch="slow")))
    add("S05-one-sign-is-no-dehydration", inp(30, 12.5, dict(WELL, eyes="sunken")))
    add("S05-two-C-signs-severe-with-danger", inp(30, 12.5, dict(WELL, condition="lethargic", eyes="sunken")))
    add("S07-young-infant-drinking-ignored", inp(1, 4.2, dict(YOUNG_WELL, drinking="unable", eyes="sunken")))
    # Plan A age split (S03).
    for age in (23.99, 24, 119.99, 120):
        add(f"S03-PlanA-age-{age}", inp(age))
    # Plan B WHO 2005 by weight and by age (S03), IMCI by weight and by age (S04).
    for weight, age in ((4.99, 3), (5, 3), (7.95, 9), (8, 9), (10.95, 18), (11, 18), (15.95, 40),
                        (16, 40), (29.95, 120), (30, 120), (70, 480)):
        add(f"S03-WHO2005-PlanB-{weight}kg", inp(age, weight, SOME))
    for age in (3.99, 4, 11.99, 12, 23.99, 24, 59.99, 60, 179.99, 180):
        add(f"S03-WHO2005-PlanB-age-{age}m-no-weight", inp(age, None, SOME))
    for weight, age in ((5.99, 3), (6, 5), (9.99, 10), (10, 14), (11.99, 20), (12, 30), (18.99, 50),
                        (19, 55), (19.5, 55), (20, 58)):
        add(f"S04-IMCI-PlanB-{weight}kg", inp(age, weight, SOME), {"plan_b_table": "imci"})
    for age in (3.99, 4, 11.99, 12, 23.99, 24, 59.99, 60):
        add(f"S04-IMCI-PlanB-age-{age}m-no-weight", inp(age, None, SOME), {"plan_b_table": "imci"})
    for weight in (7.3, 7.1, 6.97, 12):
        add(f"S04-PlanB-rounding-{weight}kg", inp(10 if weight < 8 else 30, weight, SOME))
    add("S04-PlanB-estimated-weight-entered", inp(30, 12, SOME, weight_estimated=True))
    # Plan C chain (S02, S04, S14) at both IV age schedules.
    chain = {"iv": {"iv_available": True}, "facility-29min": {"minutes_to_iv_facility": 29, "ng_trained": True},
             "facility-30min-ng": {"minutes_to_iv_facility": 30, "ng_trained": True},
             "ng": {"ng_trained": True}, "refer": {}}
    for age, weight in ((11.99, 8), (12, 10)):
        for label, settings in chain.items():
            add(f"S04-PlanC-{label}-{age}m", inp(age, weight, SEVERE), settings)
    add("S02-PlanC-IV-young-infant", inp(1, 4.2, YOUNG_SEVERE), {"iv_available": True})
    add("S02-PlanC-IV-adult", inp(400, 60, SEVERE), {"iv_available": True})
    add("S29-PlanC-IV-no-weight-apls-infant", inp(8, None, SEVERE), {"iv_available": True})
    add("S29-PlanC-NG-no-weight-apls-child", inp(30, None, SEVERE), {"ng_trained": True})
    add("S29-PlanC-IV-no-weight-apls-8y-unconfirmed-band", inp(96, None, SEVERE), {"iv_available": True})
    add("S29-PlanC-IV-no-weight-beyond-formulas", inp(400, None, SEVERE), {"iv_available": True})
    add("context-overrides-iv-setting", inp(30, 12.5, SEVERE, context={"iv_available": False, "ng_trained": True}),
        {"iv_available": True})
    add("context-minutes-to-facility", inp(30, 12.5, SEVERE, context={"minutes_to_iv_facility": 10}))
    add("settings-facility-name-and-phone", inp(30, 12.5, SEVERE),
        {"referral_facility_name": "Kaluwe District Hospital", "referral_facility_phone": "+260 900 000 111"})
    # Danger signs (S07, S27).
    for sign in ("unable_to_drink_or_breastfeed", "vomits_everything", "convulsions", "shock"):
        add(f"S07-danger-{sign}", inp(30, 12.5, WELL, danger_signs={sign: True}))
    add("S07-danger-with-some-sips-on-the-way", inp(30, 12.5, SOME, danger_signs={"convulsions": True}))
    add("S07-danger-with-severe-iv", inp(30, 12.5, SEVERE, danger_signs={"vomits_everything": True}),
        {"iv_available": True})
    add("S07-danger-lethargic-young-infant", inp(1, 4.2, dict(YOUNG_WELL, condition="lethargic")))
    # Young infants (S07, unconfirmed rules).
    add("S07-young-infant-persistent", inp(1.5, 4.5, YOUNG_WELL, diarrhoea_days=14))
    add("S07-young-infant-dysentery", inp(1.5, 4.5, YOUNG_WELL, blood_in_stool=True))
    # SAM and MAM (S17, S08, S20).
    for muac in (114, 115, 124, 125):
        add(f"S17-MUAC-{muac}", inp(18, 10.5, SOME, muac_mm=muac))
    for age in (5.99, 6, 59.99, 60):
        add(f"S17-MUAC-100-age-{age}", inp(age, None, SOME, muac_mm=100))
    add("S17-oedema-SAM", inp(30, 12.5, SOME, oedema_both_feet=True))
    add("S17-oedema-outside-ages", inp(72, 20, WELL, oedema_both_feet=True))
    for weight in (9.9, 10.6, 12.5):
        add(f"S17-WHZ-boy-30m-90cm-{weight}kg", inp(30, weight, WELL, sex="male", height_cm=90,
                                                   height_measured_lying=False))
    add("S17-WHZ-girl-10m-70cm-lying", inp(10, 6.2, SOME, sex="female", height_cm=70, height_measured_lying=True))
    add("S08-SAM-8kg-N15", inp(18, 8, SOME, muac_mm=110))
    add("S20-SAM-shock-iv", inp(18, 8, SEVERE, muac_mm=110, danger_signs={"shock": True}), {"iv_available": True})
    add("S08-SAM-no-weight", inp(18, None, SOME, muac_mm=110))
    add("S29-SAM-estimated-weight-not-used", inp(18, 8, SOME, muac_mm=110, weight_estimated=True))
    add("S08-SAM-no-signs", inp(18, 8, WELL, muac_mm=110))
    add("S08-SAM-dysentery-refer", inp(18, 8, WELL, muac_mm=110, blood_in_stool=True))
    # Zinc (S04, S07, S10).
    for age in (1.99, 2, 5.99, 6, 59.99, 60):
        add(f"S04-zinc-age-{age}", inp(age))
    add("C4-zinc-10-days-setting", inp(30), {"zinc_days_min": 10, "zinc_days_max": 10})
    # Persistent and dysentery (S08, S04, S07).
    add("S08-13-days-acute", inp(30, 12.5, WELL, diarrhoea_days=13))
    add("S08-14-days-persistent", inp(30, 12.5, WELL, diarrhoea_days=14))
    add("S04-severe-persistent-some", inp(30, 12.5, SOME, diarrhoea_days=14))
    add("S04-severe-persistent-severe", inp(30, 12.5, SEVERE, diarrhoea_days=20))
    add("S07-dysentery-policy-text", inp(30, 12.5, WELL, blood_in_stool=True),
        {"dysentery_policy_text": "Give ciprofloxacin 15 mg/kg twice daily for 3 days."})
    add("S07-dysentery-with-some", inp(30, 12.5, SOME, blood_in_stool=True, diarrhoea_days=3))
    # Cholera (S27 GTFCC, S10 antibiotic).
    add("S27-cholera-23.99m-severe", inp(23.99, 11, SEVERE))
    add("S27-cholera-24m-severe", inp(24, 11, SEVERE))
    add("S27-cholera-some-no-outbreak", inp(24, 11, SOME))
    add("S27-cholera-lethargic-alone", inp(30, 12.5, dict(WELL, condition="lethargic")))
    add("S27-cholera-outbreak-infant", inp(3, 5.8, WELL), {"cholera_outbreak": True})
    add("S27-cholera-outbreak-bloody", inp(30, 12.5, WELL, blood_in_stool=True), {"cholera_outbreak": True})
    add("S27-cholera-outbreak-6-days", inp(30, 12.5, WELL, diarrhoea_days=6), {"cholera_outbreak": True})
    add("S27-cholera-outbreak-7-days", inp(30, 12.5, WELL, diarrhoea_days=7), {"cholera_outbreak": True})
    add("S10-cholera-antibiotic-in-area", inp(24, 11, SEVERE), {"cholera_in_area": True, "iv_available": True})
    add("S10-cholera-antibiotic-outbreak", inp(400, 60, SEVERE), {"cholera_outbreak": True, "iv_available": True})
    add("S10-cholera-no-antibiotic-under-2y", inp(23.99, 11, SEVERE), {"cholera_outbreak": True})
    add("S10-cholera-context-in-area", inp(60, 18, SEVERE, context={"cholera_in_area": True}))
    # Maintenance and free-water deficit (S26, S31; values from the growth helper's functions).
    for weight, age in ((10, 18), (20, 72), (70, 480)):
        add(f"S26-maintenance-{weight}kg", inp(age, weight))
    add("S26-maintenance-25-variant-70kg", inp(480, 70), {"maintenance_above_20kg_ml_per_kg": 25})
    add("S31-free-water-10kg-na160", inp(18, 10, SOME, sodium_mmol_l=160))
    add("S31-free-water-adult-male-na154", inp(480, 70, WELL, sex="male", sodium_mmol_l=154))
    add("S31-free-water-adult-no-sex", inp(480, 70, WELL, sodium_mmol_l=154))
    add("S31-sodium-140-no-deficit", inp(30, 12.5, WELL, sodium_mmol_l=140))
    add("S31-free-water-infant-unconfirmed-tbw", inp(8, 8, SOME, sodium_mmol_l=152))
    # Scores (computed by scores.compute_scores; bands from the growth helper's rulebook).
    add("S23-CDS-items", inp(30, 12.5, SOME, score_items={"cds": {
        "general_appearance": "thirsty_restless_or_lethargic_but_irritable", "eyes": "slightly_sunken",
        "mucous_membranes": "sticky", "tears": "decreased"}}))
    add("S24-Gorelick-4-items", inp(30, 12.5, SOME, score_items={"gorelick": {
        "general_appearance": "restless_lethargic_or_unconscious", "capillary_refill": "over_2_s",
        "tears": "present", "mucous_membranes": "dry"}}))
    add("S25-DHAKA-items-outside-ages", inp(96, 25, SOME, score_items={"dhaka": {
        "general_appearance": "restless_or_irritable", "respirations": "normal", "skin_pinch": "slow",
        "tears": "decreased"}}))
    # Implausible weights (WHO-MGRS-2006; PRACTICE broad band).
    add("WHO-MGRS-2006-implausible-120kg-2y", inp(24, 120, SOME, sex="male"))
    add("WHO-MGRS-2006-implausible-120kg-2y-sex-unknown", inp(24, 120, SOME))
    add("WHO-MGRS-2006-implausible-confirmed", inp(24, 120, SOME, sex="male", confirm_implausible_weight=True))
    add("WHO-MGRS-2006-implausible-2kg-1y", inp(12, 2, WELL, sex="female"))
    add("PRACTICE-implausible-adult-15kg", inp(400, 15, WELL))
    add("PRACTICE-plausible-adult-60kg", inp(400, 60, WELL))
    # Invalid input (issue 3 contract).
    bad = {
        "age-missing": {"signs": WELL}, "age-string": inp("30"), "age-negative": inp(-1),
        "age-1440": inp(1440), "weight-low": inp(30, 0.4), "weight-high": inp(30, 251),
        "weight-bool": inp(30, True), "sex-enum": inp(30, sex="m"), "height-low": inp(30, height_cm=40),
        "muac-fraction": inp(30, muac_mm=114.5), "days-negative": inp(30, diarrhoea_days=-2),
        "blood-int": inp(30, blood_in_stool=1), "signs-missing": {"age_months": 30},
        "sign-enum": inp(30, signs=dict(WELL, skin_pinch="fast")),
        "drinking-missing-from-2m": inp(2, signs=YOUNG_WELL),
        "danger-unknown": inp(30, danger_signs={"fever": True}),
        "context-unknown": inp(30, context={"iv": True}), "unknown-field": inp(30, wieght_kg=12),
        "many-fields": inp(-1, 0, signs=dict(WELL, eyes="x"), sex="x"),
        "score-item-unknown": inp(30, score_items={"cds": {"eyes": "bulging"}}),
    }
    for label, value in bad.items():
        add(f"invalid-{label}", value)


def expected_for(inputs: dict, settings: dict) -> dict:
    try:
        result = assess(inputs, ClinicSettings(**settings))
    except AssessmentInputError as err:
        return err.as_json()
    result.pop("rulebook_version")
    return result


def main() -> None:
    build()
    names = [name for name, _i, _s in CASES]
    assert len(names) == len(set(names)), "duplicate vector names"
    vectors = []
    for name, inputs, settings in CASES:
        vector = {"name": name, "input": inputs}
        if settings:
            vector["settings"] = settings
        vector["expected"] = expected_for(inputs, settings)
        vectors.append(vector)
    OUT.write_text(json.dumps(vectors, indent=1, sort_keys=True, ensure_ascii=False) + "\n")
    print(f"{len(vectors)} vectors written to {OUT}")


if __name__ == "__main__":
    main()
