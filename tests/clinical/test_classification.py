"""Classification rules, one row per boundary, each naming its source."""

from __future__ import annotations

import pytest

from tests.clinical.core_inputs import SEVERE, SOME, WELL, case, codes, run

S = dict  # signs literal


@pytest.mark.parametrize(("signs", "expected"), [
    pytest.param(WELL, "none", id="S05-WHO-no-signs"),
    pytest.param(S(WELL, condition="restless"), "none", id="S05-WHO-one-B-sign-is-not-enough"),
    pytest.param(S(WELL, eyes="sunken"), "none", id="S05-WHO-sunken-eyes-alone"),
    pytest.param(S(WELL, condition="restless", eyes="sunken"), "some", id="S05-WHO-two-B-signs"),
    pytest.param(S(WELL, drinking="eager", skin_pinch="slow"), "some", id="S05-WHO-eager-and-slow-pinch"),
    pytest.param(S(WELL, condition="lethargic", skin_pinch="slow"), "some",
                 id="S02-C-sign-counts-towards-some"),
    pytest.param(S(WELL, drinking="poor"), "none", id="S05-WHO-one-C-sign-alone"),
    pytest.param(S(WELL, condition="lethargic", eyes="sunken"), "severe", id="S05-WHO-two-C-signs"),
    pytest.param(S(WELL, drinking="poor", skin_pinch="very_slow"), "severe",
                 id="S05-WHO-poor-drinking-and-very-slow-pinch"),
    pytest.param(S(WELL, drinking="unable", eyes="sunken"), "severe", id="S05-WHO-unable-and-sunken"),
    pytest.param(SOME, "some", id="S05-WHO-four-B-signs"),
    pytest.param(SEVERE, "severe", id="S05-WHO-three-C-signs"),
])
def test_it_classifies_dehydration_by_two_or_more_signs(signs, expected):
    assert run(case(age=30, weight=12, signs=signs))["severity"] == expected


@pytest.mark.parametrize(("signs", "expected"), [
    pytest.param({"condition": "lethargic", "eyes": "sunken", "skin_pinch": "quick"}, "severe",
                 id="S07-young-infant-moves-only-when-stimulated-and-sunken"),
    pytest.param({"condition": "restless", "eyes": "normal", "skin_pinch": "slow"}, "some",
                 id="S07-young-infant-restless-and-slow-pinch"),
    pytest.param({"condition": "well", "eyes": "sunken", "skin_pinch": "quick"}, "none",
                 id="S07-young-infant-sunken-alone"),
    pytest.param({"condition": "well", "eyes": "sunken", "drinking": "unable", "skin_pinch": "quick"},
                 "none", id="S07-young-infant-drinking-not-assessed"),
])
def test_young_infants_use_the_young_infant_signs(signs, expected):
    result = run(case(age=1.15, weight=4.5, signs=signs))
    assert result["severity"] == expected
    assert "young_infant" in result["classifications"]
    assert result["refer"] in ("routine", "urgent")


def test_a_young_infant_needs_no_drinking_sign_but_an_older_child_does():
    run(case(age=1.99, weight=4.5, signs={"condition": "well", "eyes": "normal", "skin_pinch": "quick"}))
    with pytest.raises(Exception) as err:
        run(case(age=2, weight=5, signs={"condition": "well", "eyes": "normal", "skin_pinch": "quick"}))
    assert err.value.fields == {"signs.drinking": "Drinking is required."}


@pytest.mark.parametrize(("signs", "refer", "extra_codes"), [
    pytest.param(WELL, "routine", {"young_infant_refer_routine"}, id="S07-young-infant-no-dehydration-routine"),
    pytest.param({"condition": "restless", "eyes": "sunken", "skin_pinch": "quick"}, "urgent",
                 {"young_infant_refer_urgent"}, id="S07-young-infant-some-dehydration-urgent"),
])
def test_young_infants_are_referred(signs, refer, extra_codes):
    signs = {k: v for k, v in signs.items() if k != "drinking"}
    result = run(case(age=1, weight=4, signs=signs))
    assert result["refer"] == refer
    assert extra_codes <= set(codes(result["actions"]))
    assert result["zinc"] is None  # S07 (unconfirmed): no zinc under 2 months
    rules = {c.get("rule") for c in result["cautions"]}
    assert {"young_infant_signs", "young_infant_referral", "zinc_min_age_months"} <= rules


@pytest.mark.parametrize("danger", [
    pytest.param({"danger_signs": {"unable_to_drink_or_breastfeed": True}}, id="S07-GDS-unable-to-drink"),
    pytest.param({"danger_signs": {"vomits_everything": True}}, id="S07-GDS-vomits-everything"),
    pytest.param({"danger_signs": {"convulsions": True}}, id="S07-GDS-convulsions"),
    pytest.param({"danger_signs": {"shock": True}}, id="S27-danger-absent-or-weak-pulse"),
    pytest.param({"signs": dict(WELL, condition="lethargic")}, id="S07-GDS-lethargic-from-signs"),
    pytest.param({"signs": dict(WELL, drinking="unable")}, id="S07-GDS-not-able-to-drink-from-signs"),
])
def test_any_danger_sign_means_very_severe_disease_and_urgent_referral(danger):
    result = run(case(age=30, weight=12, **danger))
    assert "very_severe_disease" in result["classifications"]
    assert result["refer"] == "urgent"
    assert codes(result["actions"])[0] == "refer_urgent_danger"


def test_danger_sign_with_dehydration_sends_sips_of_ors_on_the_way():
    # S04: refer urgently with the mother giving frequent sips of ORS on the way, keep breastfeeding.
    result = run(case(age=30, weight=12, signs=SOME, danger_signs={"convulsions": True}))
    assert codes(result["actions"])[:2] == ["refer_urgent_danger", "sips_on_the_way"]
    assert "breastfeeding" in result["actions"][1]["text"]
    without = run(case(age=30, weight=12, danger_signs={"convulsions": True}))
    assert "sips_on_the_way" not in codes(without["actions"])


@pytest.mark.parametrize(("days", "signs", "expected", "refer"), [
    pytest.param(13, WELL, None, "none", id="S08-13-days-is-acute"),
    pytest.param(14, WELL, "persistent_diarrhoea", "none", id="S08-14-days-persistent"),
    pytest.param(14, SOME, "severe_persistent_diarrhoea", "routine", id="S04-persistent-with-dehydration-refer"),
    pytest.param(30, SEVERE, "severe_persistent_diarrhoea", "urgent", id="S04-severe-persistent-plan-C-refer"),
])
def test_persistent_diarrhoea_starts_at_14_days(days, signs, expected, refer):
    result = run(case(age=30, weight=12, signs=signs, diarrhoea_days=days))
    found = {"persistent_diarrhoea", "severe_persistent_diarrhoea"} & set(result["classifications"])
    assert found == ({expected} if expected else set())
    assert result["refer"] == refer


@pytest.mark.parametrize(("age", "extra", "refer", "action"), [
    pytest.param(30, {}, "none", "dysentery_policy", id="S07-dysentery-policy-text"),
    pytest.param(1, {}, "urgent", "dysentery_refer", id="S08-young-infant-with-dysentery-admit"),
    pytest.param(30, {"muac_mm": 110}, "urgent", "dysentery_refer", id="S08-SAM-with-dysentery-admit"),
])
def test_blood_in_the_stool_is_dysentery(age, extra, refer, action):
    signs = WELL if age >= 2 else {k: v for k, v in WELL.items() if k != "drinking"}
    result = run(case(age=age, weight=12 if age >= 2 else 4, signs=signs, blood_in_stool=True, **extra),
                 dysentery_policy_text="Give ciprofloxacin as the district protocol says.")
    assert "dysentery" in result["classifications"]
    assert result["refer"] == refer
    assert action in codes(result["actions"])
    if action == "dysentery_policy":
        text = dict((a["code"], a["text"]) for a in result["actions"])[action]
        assert "Give ciprofloxacin as the district protocol says." in text


@pytest.mark.parametrize(("age", "signs", "extra", "settings", "suspected"), [
    pytest.param(23.99, SEVERE, {}, {}, False, id="S27-GTFCC-under-24-months-no-outbreak"),
    pytest.param(24, SEVERE, {}, {}, True, id="S27-GTFCC-24-months-severe"),
    pytest.param(24, SOME, {}, {}, False, id="S27-GTFCC-some-dehydration-no-outbreak"),
    pytest.param(30, dict(WELL, condition="lethargic"), {}, {}, True,
                 id="S27-GTFCC-one-danger-sign-is-severe-for-cholera"),
    pytest.param(30, WELL, {"danger_signs": {"shock": True}}, {}, True, id="S27-GTFCC-weak-pulse"),
    pytest.param(3, WELL, {}, {"cholera_outbreak": True}, True, id="S27-GTFCC-any-age-in-outbreak"),
    pytest.param(30, WELL, {"blood_in_stool": True}, {"cholera_outbreak": True}, False,
                 id="S27-GTFCC-bloody-is-not-watery"),
    pytest.param(30, WELL, {"diarrhoea_days": 6}, {"cholera_outbreak": True}, True, id="S27-GTFCC-6-days-acute"),
    pytest.param(30, WELL, {"diarrhoea_days": 7}, {"cholera_outbreak": True}, False,
                 id="S27-GTFCC-7-days-not-acute"),
    pytest.param(30, WELL, {"context": {"cholera_outbreak": True}}, {}, True, id="context-declares-outbreak"),
])
def test_suspected_cholera_follows_the_gtfcc_definitions(age, signs, extra, settings, suspected):
    result = run(case(age=age, weight=12 if age >= 12 else 6, signs=signs, **extra), **settings)
    assert ("suspected_cholera" in result["classifications"]) is suspected


@pytest.mark.parametrize(("age", "signs", "settings", "note"), [
    pytest.param(24, SEVERE, {"cholera_in_area": True}, True, id="S10-2y-severe-cholera-in-area"),
    pytest.param(24, SEVERE, {"cholera_outbreak": True}, True, id="S10-outbreak-counts-as-in-area"),
    pytest.param(23.99, SEVERE, {"cholera_outbreak": True}, False, id="S10-under-2-years-no-antibiotic"),
    pytest.param(24, SEVERE, {}, False, id="S10-no-cholera-in-area"),
    pytest.param(24, SOME, {"cholera_outbreak": True}, False, id="S10-some-dehydration-no-antibiotic"),
])
def test_the_cholera_antibiotic_note(age, signs, settings, note):
    result = run(case(age=age, weight=12, signs=signs), **settings)
    assert ("cholera_antibiotic" in codes(result["actions"])) is note


@pytest.mark.parametrize(("age", "muac", "expected"), [
    pytest.param(30, 114, "severe_acute_malnutrition", id="S17-MUAC-114-SAM"),
    pytest.param(30, 115, "moderate_acute_malnutrition", id="S17-MUAC-115-MAM"),
    pytest.param(30, 124, "moderate_acute_malnutrition", id="S17-MUAC-124-MAM"),
    pytest.param(30, 125, None, id="S17-MUAC-125-not-wasted"),
    pytest.param(5.99, 100, None, id="S17-MUAC-not-applied-under-6-months"),
    pytest.param(6, 100, "severe_acute_malnutrition", id="S17-MUAC-from-6-months"),
    pytest.param(59.99, 100, "severe_acute_malnutrition", id="S17-MUAC-to-59-months"),
    pytest.param(60, 100, None, id="S17-MUAC-not-applied-from-60-months"),
])
def test_muac_bands(age, muac, expected):
    result = run(case(age=age, muac_mm=muac))
    found = {"severe_acute_malnutrition", "moderate_acute_malnutrition"} & set(result["classifications"])
    assert found == ({expected} if expected else set())
    assert result["plan"] == ("SAM" if expected == "severe_acute_malnutrition" else "A")


def test_oedema_of_both_feet_is_sam_in_6_to_59_months_only():
    # S17: bilateral oedema is an independent SAM criterion.
    assert run(case(age=30, oedema_both_feet=True))["plan"] == "SAM"
    older = run(case(age=72, weight=20, oedema_both_feet=True))
    assert older["plan"] == "A"
    assert "oedema_outside_sam_ages" in codes(older["cautions"])


@pytest.mark.parametrize(("weight", "expected"), [
    # WHO-MGRS-2006 WFH, boy 30 months, 90 cm standing; z from growth.wflh_z (S17 cut-offs).
    pytest.param(9.9, "severe_acute_malnutrition", id="S17-WHZ-below-minus-3-SAM"),
    pytest.param(10.6, "moderate_acute_malnutrition", id="S17-WHZ-minus-3-to-minus-2-MAM"),
    pytest.param(12.5, None, id="S17-WHZ-normal"),
])
def test_weight_for_height_z_bands(weight, expected):
    result = run(case(age=30, weight=weight, sex="male", height_cm=90, height_measured_lying=False))
    z = result["anthropometry"]["wflh_z"]
    found = {"severe_acute_malnutrition", "moderate_acute_malnutrition"} & set(result["classifications"])
    assert found == ({expected} if expected else set())
    if expected == "severe_acute_malnutrition":
        assert z < -3
    elif expected:
        assert -3 <= z < -2
    else:
        assert z >= -2


def test_an_estimated_weight_never_feeds_the_weight_for_height_z():
    result = run(case(age=30, weight=9.9, weight_estimated=True, sex="male", height_cm=90))
    assert result["anthropometry"]["wflh_z"] is None
    assert result["plan"] == "A"
