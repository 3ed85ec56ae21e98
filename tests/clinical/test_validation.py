"""Input errors: one clear message per bad field; implausible weights never give a volume."""

from __future__ import annotations

import pytest

from clinic_app.clinical import AssessmentInputError
from tests.clinical.core_inputs import SOME, WELL, case, run


def errors_of(inputs) -> tuple[str, dict]:
    with pytest.raises(AssessmentInputError) as err:
        run(inputs)
    return err.value.code, err.value.fields


@pytest.mark.parametrize(("inputs", "field", "message"), [
    pytest.param({"signs": WELL}, "age_months", "Age in months is required.", id="age-missing"),
    pytest.param(case(age="30"), "age_months", "Age in months must be a number.", id="age-string"),
    pytest.param(case(age=True), "age_months", "Age in months must be a number.", id="age-boolean"),
    pytest.param(case(age=-0.1), "age_months",
                 "Age in months must be at least 0 and less than 1440.", id="age-negative"),
    pytest.param(case(age=1440), "age_months",
                 "Age in months must be at least 0 and less than 1440.", id="age-1440-excluded"),
    pytest.param(case(weight=0.49), "weight_kg", "Weight must be from 0.5 to 250 kg.", id="weight-low"),
    pytest.param(case(weight=250.1), "weight_kg", "Weight must be from 0.5 to 250 kg.", id="weight-high"),
    pytest.param(case(weight="12"), "weight_kg", "Weight must be a number.", id="weight-string"),
    pytest.param(case(weight_estimated="yes"), "weight_estimated",
                 "Weight estimated must be true or false.", id="boolean-string"),
    pytest.param(case(sex="boy"), "sex", "Sex must be one of: female, male.", id="sex-enum"),
    pytest.param(case(height_cm=44.9), "height_cm", "Height or length must be from 45 to 230 cm.",
                 id="height-low"),
    pytest.param(case(height_cm=230.5), "height_cm", "Height or length must be from 45 to 230 cm.",
                 id="height-high"),
    pytest.param(case(muac_mm=114.5), "muac_mm", "MUAC must be a whole number.", id="muac-fraction"),
    pytest.param(case(muac_mm=20), "muac_mm", "MUAC must be from 50 to 500 mm.", id="muac-range"),
    pytest.param(case(diarrhoea_days=-1), "diarrhoea_days", "Days of diarrhoea must be at least 0.",
                 id="days-negative"),
    pytest.param(case(diarrhoea_days=2.5), "diarrhoea_days", "Days of diarrhoea must be a whole number.",
                 id="days-fraction"),
    pytest.param(case(blood_in_stool=1), "blood_in_stool", "Blood in the stool must be true or false.",
                 id="blood-int"),
    pytest.param(case(oedema_both_feet="true"), "oedema_both_feet",
                 "Oedema of both feet must be true or false.", id="oedema-string"),
    pytest.param({"age_months": 30}, "signs", "Signs is required.", id="signs-missing"),
    pytest.param({"age_months": 30, "signs": ["well"]}, "signs",
                 "Signs must be an object with named fields.", id="signs-not-object"),
    pytest.param(case(signs=dict(WELL, eyes="closed")), "signs.eyes",
                 "Eyes must be one of: normal, sunken.", id="sign-enum"),
    pytest.param({"age_months": 30, "signs": {k: v for k, v in WELL.items() if k != "skin_pinch"}},
                 "signs.skin_pinch", "Skin pinch is required.", id="sign-missing"),
    pytest.param(case(signs=dict(WELL, tears="absent")), "signs.tears",
                 "This field is not part of the assessment input.", id="sign-unknown"),
    pytest.param(case(danger_signs={"convulsions": "no"}), "danger_signs.convulsions",
                 "Convulsions must be true or false.", id="danger-not-boolean"),
    pytest.param(case(danger_signs={"fever": True}), "danger_signs.fever",
                 "This field is not part of the assessment input.", id="danger-unknown"),
    pytest.param(case(context={"iv_avail": True}), "context.iv_avail",
                 "This field is not part of the assessment input.", id="context-unknown-key"),
    pytest.param(case(context={"minutes_to_iv_facility": -5}), "context.minutes_to_iv_facility",
                 "Minutes to the IV facility must be from 0 to 10080.", id="context-minutes-negative"),
    pytest.param(case(context={"ng_trained": "yes"}), "context.ng_trained",
                 "Trained in nasogastric rehydration must be true or false.", id="context-boolean"),
    pytest.param(case(sodium_mmol_l=90), "sodium_mmol_l", "Sodium must be from 100 to 200 mmol/L.",
                 id="sodium-range"),
    pytest.param(case(wieght_kg=12), "wieght_kg", "This field is not part of the assessment input.",
                 id="typo-is-not-ignored"),
    pytest.param(case(confirm_implausible_weight="y"), "confirm_implausible_weight",
                 "Confirm implausible weight must be true or false.", id="confirm-not-boolean"),
])
def test_it_rejects_each_bad_field_with_one_message(inputs, field, message):
    code, fields = errors_of(inputs)
    assert code == "invalid_input"
    assert fields == {field: message}


def test_it_reports_every_bad_field_at_once():
    code, fields = errors_of(case(age=-1, weight=0, sex="x", signs=dict(WELL, eyes="?")))
    assert code == "invalid_input"
    assert set(fields) == {"age_months", "weight_kg", "sex", "signs.eyes"}


def test_it_rejects_a_body_that_is_not_an_object():
    assert errors_of([1, 2]) == ("invalid_input", {"body": "The request must be a JSON object."})


def test_nan_is_not_a_number():
    assert errors_of(case(weight=float("nan")))[1] == {"weight_kg": "Weight must be a number."}


def test_null_optional_fields_are_absent():
    result = run(case(weight=None, sex=None, muac_mm=None, context=None, danger_signs=None))
    assert result["plan"] == "A"


def test_integral_floats_count_as_whole_numbers_as_in_javascript():
    assert run(case(muac_mm=130.0, diarrhoea_days=3.0))["plan"] == "A"


def test_score_item_errors_are_field_errors_too():
    code, fields = errors_of(case(score_items={"cds": {"eyes": "bulging"}}))
    assert code == "invalid_input" and list(fields) == ["score_items.cds.eyes"]


# --- Implausible weight (WHO-MGRS-2006: WAZ < -6 or > +5) -----------------------------------


@pytest.mark.parametrize(("age", "weight", "sex"), [
    pytest.param(24, 120, "male", id="WHO-MGRS-2006-120kg-two-year-old"),
    pytest.param(24, 120, None, id="WHO-MGRS-2006-120kg-two-year-old-sex-unknown"),
    pytest.param(12, 2, "female", id="WHO-MGRS-2006-2kg-one-year-old"),
    pytest.param(3, 12, None, id="WHO-MGRS-2006-12kg-three-month-old"),
    pytest.param(400, 15, None, id="PRACTICE-broad-band-adult-15kg"),
    pytest.param(100, 150, "female", id="PRACTICE-broad-band-8y-150kg"),
])
def test_an_implausible_weight_is_refused_unless_confirmed(age, weight, sex):
    inputs = case(age=age, weight=weight, signs=SOME, **({"sex": sex} if sex else {}))
    code, fields = errors_of(inputs)
    assert code == "implausible_weight" and list(fields) == ["weight_kg"]
    result = run(dict(inputs, confirm_implausible_weight=True))
    assert "implausible_weight_confirmed" in [c["code"] for c in result["cautions"]]


@pytest.mark.parametrize(("age", "weight"), [
    pytest.param(24, 12, id="WHO-MGRS-2006-12kg-two-year-old"),
    pytest.param(400, 60, id="PRACTICE-adult-60kg"),
    pytest.param(100, 25, id="PRACTICE-8y-25kg"),
])
def test_a_plausible_weight_passes(age, weight):
    assert run(case(age=age, weight=weight))["plan"] == "A"


def test_the_message_for_a_known_sex_names_the_expected_range():
    _code, fields = errors_of(case(age=24, weight=120, sex="male"))
    assert "expected about" in fields["weight_kg"]
