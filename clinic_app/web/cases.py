"""Cases after the first assessment: lists in the user's scope, "due now", a case with its
chain of assessments, reassessment, bedside monitoring with the fluid-balance chart, and the
outcome. Every view and change of a case goes to the audit log (never its clinical content).
"""

from __future__ import annotations

import json
import uuid
from datetime import datetime, timedelta

from flask import Blueprint, abort, flash, g, redirect, render_template, request, url_for
from flask_wtf import FlaskForm
from wtforms import (
    BooleanField,
    DateField,
    DecimalField,
    RadioField,
    SelectField,
    StringField,
)
from wtforms.fields.choices import SelectChoice
from wtforms.validators import InputRequired, Length, NumberRange, Optional

from clinic_app import clock
from clinic_app.clinical import followup
from clinic_app.i18n import _, lazy_gettext
from clinic_app.storage import audit, cases
from clinic_app.storage import followup as store
from clinic_app.storage import settings as settings_store
from clinic_app.storage.db import get_db, write
from clinic_app.web import fluid_chart
from clinic_app.web import followup_records as records
from clinic_app.web.fields import IntegerField

bp = Blueprint("cases", __name__, url_prefix="/cases")


def _choices(pairs) -> list[SelectChoice]:
    return [SelectChoice(value, label) for value, label in pairs]

# I18N: values of the case-list status filter
STATUS_CHOICES = [("", lazy_gettext("All")), ("open", lazy_gettext("Open")),
                  ("closed", lazy_gettext("Closed"))]
OUTCOME_LABELS = {
    "recovered_home": lazy_gettext("Recovered, treated at home"),
    "referred": lazy_gettext("Referred"),
    "admitted": lazy_gettext("Admitted"),
    "died": lazy_gettext("Died"),
    "lost_to_follow_up": lazy_gettext("Lost to follow-up"),
}
DUE_LABELS = {"check": lazy_gettext("Bedside check"), "reassess": lazy_gettext("Reassessment"),
              "escalate": lazy_gettext("Not improving? Send for IV")}


def _view(case_id: str):
    """The case if the user may see it (404 otherwise), with the view written to the log."""
    conn = get_db()
    case = cases.get_case_for_user(conn, case_id, g.user)
    if case is None:
        abort(404)
    _audit(conn, "case.view", "case", case_id)
    return conn, case


def _audit(conn, action: str, record_type: str, record_id: str) -> None:
    with write(conn):
        audit.record(conn, at=clock.iso(clock.now()), user_id=g.user["id"], action=action,
                     record_type=record_type, record_id=record_id)


def due_lists(conn, user, now: datetime) -> tuple[list[dict], list]:
    """(bedside items due or coming for open cases, follow-up visits due by today)."""
    settings = settings_store.load(conn)
    items = []
    for case in store.open_cases(conn, user):
        state = records.case_state(conn, case, settings, now)
        items += [{**item, "case": case} for item in state["due"]]
    items.sort(key=lambda item: item["due_at"])
    return items, store.due_visits(conn, user, up_to=now.date().isoformat())


# --- lists ---------------------------------------------------------------------------------
class FilterForm(FlaskForm):
    class Meta:
        csrf = False  # a GET search form changes nothing

    status = SelectField(lazy_gettext("Status"), choices=_choices(
        STATUS_CHOICES + list(OUTCOME_LABELS.items())), default="", validate_choice=False)
    date_from = DateField(lazy_gettext("From"), validators=[Optional()])
    date_to = DateField(lazy_gettext("To"), validators=[Optional()])
    village = StringField(lazy_gettext("Village"), validators=[Optional(), Length(max=100)])
    q = StringField(lazy_gettext("Household reference"), validators=[Optional(), Length(max=64)])


@bp.get("/")
def index():
    form = FilterForm(request.args)
    rows = []
    if form.validate():
        rows = store.list_cases(
            get_db(), g.user, status=form.status.data or "",
            date_from=form.date_from.data.isoformat() if form.date_from.data else "",
            date_to=form.date_to.data.isoformat() if form.date_to.data else "",
            village=(form.village.data or "").strip(), household_ref=(form.q.data or "").strip())
    return render_template("cases/index.html", form=form, rows=rows,
                           villages=store.villages(get_db(), g.user),
                           outcome_labels=OUTCOME_LABELS)


@bp.get("/due")
def due():
    now = clock.now()
    items, visits = due_lists(get_db(), g.user, now)
    return render_template("cases/due.html", items=items, visits=visits, now=now,
                           labels=DUE_LABELS)


# --- one case ------------------------------------------------------------------------------
@bp.get("/<case_id>")
def detail(case_id: str):
    conn, case = _view(case_id)
    now = clock.now()
    state = records.case_state(conn, case, settings_store.load(conn), now)
    chain = [{"at": case["created_at"], "result": json.loads(case["server_result"]),
              "transition": None, "send_for_iv": False}]
    for row in store.reassessments_for(conn, case_id):
        step = {"transition": row["transition"], "send_for_iv": bool(row["send_for_iv"])}
        chain.append({"at": row["assessed_at"], "result": json.loads(row["server_result"]),
                      **step, "texts": followup.next_step_texts(step)})
    return render_template("cases/detail.html", case=case, state=state, chain=chain, now=now,
                           outcomes=store.outcomes_for(conn, case_id),
                           visits=store.visits_for(conn, case_id),
                           outcome_labels=OUTCOME_LABELS, labels=DUE_LABELS,
                           classifications=json.loads(case["classifications"]))


# I18N: answers for the four signs on the reassessment form
SIGN_CHOICES = {
    "condition": [("well", lazy_gettext("Well, alert")), ("restless", lazy_gettext(
        "Restless, irritable")), ("lethargic", lazy_gettext("Lethargic or unconscious"))],
    "eyes": [("normal", lazy_gettext("Normal")), ("sunken", lazy_gettext("Sunken"))],
    "drinking": [("normal", lazy_gettext("Drinks normally")), ("eager", lazy_gettext(
        "Drinks eagerly, thirsty")), ("poor", lazy_gettext("Drinks poorly")),
        ("unable", lazy_gettext("Not able to drink"))],
    "skin_pinch": [("quick", lazy_gettext("Goes back quickly")), ("slow", lazy_gettext(
        "Goes back slowly")), ("very_slow", lazy_gettext("Goes back very slowly (over 2 s)"))],
}


class ReassessForm(FlaskForm):
    condition = RadioField(lazy_gettext("General condition"), choices=_choices(SIGN_CHOICES["condition"]),
                           validators=[InputRequired()])
    eyes = RadioField(lazy_gettext("Eyes"), choices=_choices(SIGN_CHOICES["eyes"]),
                      validators=[InputRequired()])
    drinking = RadioField(lazy_gettext("Offered a drink"), choices=_choices(SIGN_CHOICES["drinking"]),
                          validators=[Optional()])
    skin_pinch = RadioField(lazy_gettext("Skin pinch"), choices=_choices(SIGN_CHOICES["skin_pinch"]),
                            validators=[InputRequired()])
    weight_kg = DecimalField(lazy_gettext("Weight now (kg)"), places=None,
                             validators=[Optional(), NumberRange(min=0.5, max=250)])
    unable_to_drink_or_breastfeed = BooleanField(lazy_gettext("Not able to drink or breastfeed"))
    vomits_everything = BooleanField(lazy_gettext("Vomits everything"))
    convulsions = BooleanField(lazy_gettext("Convulsions"))
    shock = BooleanField(lazy_gettext("Weak or absent pulse (shock)"))


DANGER_SIGNS = ("unable_to_drink_or_breastfeed", "vomits_everything", "convulsions", "shock")


def new_input(base: dict, form: ReassessForm) -> dict:
    """The case's input with the new signs (and weight, when re-weighed)."""
    signs = {"condition": form.condition.data, "eyes": form.eyes.data,
             "skin_pinch": form.skin_pinch.data}
    if form.drinking.data:
        signs["drinking"] = form.drinking.data
    out = {k: v for k, v in base.items() if k not in ("signs", "danger_signs")}
    out["signs"] = signs
    # Danger signs are asked again: a child can deteriorate between assessments.
    out["danger_signs"] = {name: getattr(form, name).data for name in DANGER_SIGNS}
    if form.weight_kg.data is not None:
        out["weight_kg"] = float(form.weight_kg.data)
    return out


@bp.route("/<case_id>/reassess", methods=["GET", "POST"])
def reassess(case_id: str):
    conn, case = _view(case_id)
    form = ReassessForm()
    base, _result, _started = records.current_plan(conn, case)
    error = None
    if form.validate_on_submit():
        raw = {"id": str(uuid.uuid4()), "case_id": case_id,
               "assessed_at": clock.iso(clock.now()), "input": new_input(base, form)}
        try:
            row = records.build_reassessment(
                conn, case, raw, settings=settings_store.load(conn), user_id=g.user["id"],
                device_id=None, received_at=clock.iso(clock.now()))
        except records.RecordRejected as exc:
            error = str(exc)
        else:
            records.save(conn, "reassessment", row, raw)
            return redirect(url_for("cases.detail", case_id=case_id) + "#latest")
    status = 200 if request.method == "GET" or not (form.errors or error) else 422
    return render_template("cases/reassess.html", case=case, form=form, error=error,
                           base_input=base), status


class MonitorForm(FlaskForm):
    what = SelectField(lazy_gettext("What"), choices=_choices([
        ("ors", lazy_gettext("ORS given")), ("other", lazy_gettext("Other fluid given")),
        ("stool", lazy_gettext("Stool")), ("vomit", lazy_gettext("Vomit")),
        ("urine", lazy_gettext("Urine")), ("check", lazy_gettext("Bedside check"))]))
    ml = IntegerField(lazy_gettext("Millilitres"), validators=[Optional(),
                                                              NumberRange(min=0, max=5000)])
    cups = DecimalField(lazy_gettext("Cups"), places=None,
                        validators=[Optional(), NumberRange(min=0, max=20)])
    minutes_ago = IntegerField(lazy_gettext("Minutes ago"), default=0,
                               validators=[Optional(), NumberRange(min=0, max=24 * 60)])
    puffy_eyelids = BooleanField(lazy_gettext("Puffy eyelids"))
    not_improving = BooleanField(lazy_gettext("Not improving"))


@bp.route("/<case_id>/monitor", methods=["GET", "POST"])
def monitor(case_id: str):
    conn, case = _view(case_id)
    form = MonitorForm()
    error = None
    if form.validate_on_submit():
        moment = clock.now() - timedelta(minutes=form.minutes_ago.data or 0)
        raw = {"id": str(uuid.uuid4()), "case_id": case_id, "at": clock.iso(moment),
               "what": form.what.data, "ml": form.ml.data,
               "cups": float(form.cups.data) if form.cups.data is not None else None,
               "puffy_eyelids": form.puffy_eyelids.data,
               "not_improving": form.not_improving.data}
        try:
            row = records.build_monitoring(case, raw, user_id=g.user["id"], device_id=None,
                                           received_at=clock.iso(clock.now()))
        except records.RecordRejected as exc:
            error = str(exc)
        else:
            records.save(conn, "monitoring", row, raw)
            return redirect(url_for("cases.monitor", case_id=case_id))
    now = clock.now()
    settings = settings_store.load(conn)
    state = records.case_state(conn, case, settings, now)
    chart = fluid_chart.render(state["balance"], state["started_at"], now)
    status = 200 if request.method == "GET" or not (form.errors or error) else 422
    return render_template("cases/monitor.html", case=case, form=form, error=error,
                           state=state, chart=chart, cup_ml=settings.cup_ml), status


class OutcomeForm(FlaskForm):
    outcome = RadioField(lazy_gettext("Outcome"), choices=_choices(OUTCOME_LABELS.items()),
                         validators=[InputRequired()])
    improving = BooleanField(lazy_gettext("Improving"), default=True)
    referred_to = StringField(lazy_gettext("Referred to"), validators=[Optional(),
                                                                       Length(max=200)])
    transport = StringField(lazy_gettext("Transport"), validators=[Optional(),
                                                                   Length(max=100)])
    # A referral is often written down after the child has left: when did they leave?
    referred_minutes_ago = IntegerField(lazy_gettext("Left for the referral (minutes ago)"),
                                        default=0, validators=[Optional(), NumberRange(
                                            min=0, max=7 * 24 * 60)])
    followup_date = DateField(lazy_gettext("Follow-up visit (leave empty to use the rule)"),
                              validators=[Optional()])


@bp.route("/<case_id>/outcome", methods=["GET", "POST"])
def outcome(case_id: str):
    conn, case = _view(case_id)
    form = OutcomeForm()
    error = None
    if form.validate_on_submit():
        moment = clock.now()
        now = clock.iso(moment)
        left = moment - timedelta(minutes=form.referred_minutes_ago.data or 0)
        raw = {"id": str(uuid.uuid4()), "case_id": case_id, "at": now,
               "outcome": form.outcome.data, "improving": form.improving.data,
               "referred_to": form.referred_to.data or None,
               "referred_at": clock.iso(left) if form.outcome.data == "referred" else None,
               "transport": form.transport.data or None,
               "followup_date": form.followup_date.data.isoformat()
               if form.followup_date.data else None}
        try:
            row = records.build_outcome(case, raw, user_id=g.user["id"], device_id=None,
                                        received_at=now)
        except records.RecordRejected as exc:
            error = str(exc)
        else:
            records.save(conn, "outcome", row, raw)
            flash(_("Outcome recorded."))
            return redirect(url_for("cases.detail", case_id=case_id))
    status = 200 if request.method == "GET" or not (form.errors or error) else 422
    return render_template("cases/outcome.html", case=case, form=form, error=error), status


class VisitForm(FlaskForm):
    pass


@bp.post("/<case_id>/visits/<int:visit_id>/done")
def visit_done(case_id: str, visit_id: int):
    conn, case = _view(case_id)
    if not VisitForm().validate_on_submit():
        abort(400)
    if visit_id not in {v["id"] for v in store.visits_for(conn, case_id)}:
        abort(404)
    with write(conn):
        store.visit_done(conn, visit_id, g.user["id"], clock.iso(clock.now()))
        audit.record(conn, at=clock.iso(clock.now()), user_id=g.user["id"],
                     action="visit.done", record_type="case", record_id=case_id)
    return redirect(url_for("cases.detail", case_id=case_id))
