"""The phone's assessment screen. Without JavaScript the form posts here and the server
computes and saves; with JavaScript static/js/pages/assess.js computes on the phone with the
offline engine and saves to the outbox. Both draw the result from one Jinja partial.
"""

from __future__ import annotations

import uuid

from flask import Blueprint, g, redirect, render_template, request, url_for
from flask_wtf import FlaskForm
from wtforms import (
    BooleanField,
    FloatField,
    HiddenField,
    RadioField,
    SelectField,
    StringField,
    TextAreaField,
)
from wtforms.fields.choices import SelectChoice
from wtforms.validators import InputRequired, Length, NumberRange, Optional

from clinic_app import clock
from clinic_app.i18n import _, lazy_gettext
from clinic_app.storage import settings as settings_store
from clinic_app.storage.db import get_db
from clinic_app.web.assess_view import build_input, present, words
from clinic_app.web.fields import IntegerField

bp = Blueprint("assess", __name__)


def _choices(*pairs) -> list[SelectChoice]:
    return [SelectChoice(value, label) for value, label in pairs]

DANGER_SIGNS = (
    ("unable_to_drink_or_breastfeed", lazy_gettext("Not able to drink or breastfeed")),
    ("vomits_everything", lazy_gettext("Vomits everything")),
    ("convulsions", lazy_gettext("Convulsions now or during this illness")),
    ("shock", lazy_gettext("Cold hands with a weak or absent pulse")),
)


class AssessForm(FlaskForm):
    # Danger signs first.
    unable_to_drink_or_breastfeed = BooleanField(DANGER_SIGNS[0][1])
    vomits_everything = BooleanField(DANGER_SIGNS[1][1])
    convulsions = BooleanField(DANGER_SIGNS[2][1])
    shock = BooleanField(DANGER_SIGNS[3][1])
    age_value = FloatField(lazy_gettext("Age"), validators=[InputRequired(), NumberRange(min=0)])
    age_unit = SelectField(lazy_gettext("Age in"), choices=_choices(
        ("months", lazy_gettext("months")), ("weeks", lazy_gettext("weeks")),
        ("years", lazy_gettext("years"))), default="months")
    sex = SelectField(lazy_gettext("Sex"), choices=_choices(
        ("", lazy_gettext("Not recorded")), ("female", lazy_gettext("Girl")),
        ("male", lazy_gettext("Boy"))), default="")
    weight_kg = FloatField(lazy_gettext("Weight (kg)"), validators=[Optional()])
    no_scale = BooleanField(lazy_gettext("No scale: weight not measured"))
    confirm_implausible_weight = BooleanField(
        lazy_gettext("I have checked the weight and it is right"))
    muac_mm = IntegerField(lazy_gettext("MUAC (mm)"), validators=[Optional()])
    oedema_both_feet = BooleanField(lazy_gettext("Swelling (oedema) of both feet"))
    condition = RadioField(lazy_gettext("General condition"), choices=_choices(
        ("well", lazy_gettext("Well, alert")), ("restless", lazy_gettext("Restless, irritable")),
        ("lethargic", lazy_gettext("Lethargic or unconscious (under 2 months: moves only when "
                                   "stimulated, or not at all)"))), validators=[Optional()])
    eyes = RadioField(lazy_gettext("Eyes"), choices=_choices(
        ("normal", lazy_gettext("Normal")), ("sunken", lazy_gettext("Sunken"))),
        validators=[Optional()])
    drinking = RadioField(lazy_gettext("Offer water or ORS"), choices=_choices(
        ("normal", lazy_gettext("Drinks normally")), ("eager", lazy_gettext("Drinks eagerly, thirsty")),
        ("poor", lazy_gettext("Drinks poorly")), ("unable", lazy_gettext("Not able to drink"))),
        validators=[Optional()])
    skin_pinch = RadioField(lazy_gettext("Skin pinch of the belly"), choices=_choices(
        ("quick", lazy_gettext("Goes back quickly")), ("slow", lazy_gettext("Goes back slowly")),
        ("very_slow", lazy_gettext("Goes back very slowly (more than 2 seconds)"))),
        validators=[Optional()])
    diarrhoea_days = IntegerField(lazy_gettext("Days of diarrhoea"),
                                  validators=[Optional(), NumberRange(min=0, max=365)])
    blood_in_stool = BooleanField(lazy_gettext("Blood in the stool"))


SIGN_HINTS = {
    "condition": lazy_gettext("Watch the child: alert, fussy, or hard to wake?"),
    "eyes": lazy_gettext("Look at the eyes; ask the mother if they look usual."),
    "drinking": lazy_gettext("Offer a cup or spoon and watch how the child drinks. Not asked "
                             "under 2 months."),
    "skin_pinch": lazy_gettext("Pinch the belly skin for one second, let go, count."),
}


class SaveForm(FlaskForm):
    """What was given and recorded with the case (also the fields of the phone's save)."""

    case_id = HiddenField()
    ors_sachets = IntegerField(lazy_gettext("ORS sachets given"), default=0,
                               validators=[Optional(), NumberRange(min=0, max=1000)])
    zinc_tablets = IntegerField(lazy_gettext("Zinc tablets given"), default=0,
                                validators=[Optional(), NumberRange(min=0, max=1000)])
    referral_made = BooleanField(lazy_gettext("Referral made"))
    caregiver_language = StringField(lazy_gettext("Caregiver's language"),
                                     validators=[Optional(), Length(max=35)])
    household_ref = StringField(lazy_gettext("Household reference"),
                                validators=[Optional(), Length(max=64)])
    note = TextAreaField(lazy_gettext("Note"), validators=[Optional(), Length(max=2000)])


def _render(form, save_form, *, result=None, view=None, errors=None, status=200):
    settings = settings_store.load(get_db())
    return render_template(
        "assess/new.html", form=form, save_form=save_form, result=result, view=view,
        errors=errors or {}, hints=SIGN_HINTS, danger_signs=DANGER_SIGNS, words=words(),
        settings=settings), status


@bp.route("/assess", methods=["GET", "POST"])
def new():
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import AssessmentInputError

    form = AssessForm()
    save_form = SaveForm(prefix="save")
    if request.method == "GET":
        return _render(form, save_form)
    if not form.validate_on_submit():
        return _render(form, save_form, status=422)
    inputs = build_input(form.data)
    settings = settings_store.load(get_db())
    try:
        result = assess(inputs, settings)
    except AssessmentInputError as exc:
        errors = {key.split(".")[-1]: message for key, message in exc.fields.items()}
        if exc.code == "implausible_weight":
            errors["confirm_implausible_weight"] = _("Check the weight, or confirm it.")
        return _render(form, save_form, errors=errors, status=422)
    if request.form.get("action") == "save" and save_form.validate():
        return _save(inputs, result, save_form)
    if not save_form.case_id.data:
        save_form.case_id.data = str(uuid.uuid4())
    view = present(result, settings, inputs["age_months"])
    return _render(form, save_form, result=result, view=view)


def _save(inputs: dict, result: dict, save_form: SaveForm):
    """Store the case from the server form (no phone, no outbox): same rules as a sync."""
    from clinic_app.web.api_sync import CaseRejected, build_case, store_case

    raw = {"id": save_form.case_id.data or str(uuid.uuid4()),
           "created_at": clock.iso(clock.now()), "area": g.user["area"] or "",
           "input": inputs, "result": result,
           "given": {"ors_sachets": save_form.ors_sachets.data or 0,
                     "zinc_tablets": save_form.zinc_tablets.data or 0},
           "referral_made": bool(save_form.referral_made.data),
           "caregiver_language": save_form.caregiver_language.data or "",
           "household_ref": save_form.household_ref.data or None,
           "note": save_form.note.data or None}
    conn = get_db()
    try:
        case = build_case(raw, user_id=g.user["id"], device_id=None,
                          user_active=bool(g.user["active"]), received_at=raw["created_at"],
                          settings=settings_store.load(conn))
    except CaseRejected as exc:
        return render_template("errors/error.html", status=422, title=_("Not saved"),
                               message=str(exc)), 422
    store_case(conn, case, raw)
    return redirect(url_for("assess.saved", case_id=case.id))


@bp.get("/assess/saved/<case_id>")
def saved(case_id: str):
    return render_template("assess/saved.html", case_id=case_id)
