"""The supervisor's pages: weekly tallies, quality, trends, alerts, supplies and exports.

Supervisors and admins see everything here; nurses may open the supplies page to enter
receipts and adjustments; a CHW gets 403 everywhere. Every download is audit-logged.
"""

from __future__ import annotations

import csv
import io
from datetime import date

from flask import (
    Blueprint,
    Response,
    abort,
    flash,
    g,
    redirect,
    render_template,
    request,
    url_for,
)
from flask_wtf import FlaskForm
from wtforms import SelectField, StringField, TextAreaField
from wtforms.fields.choices import SelectChoice
from wtforms.validators import DataRequired, Length, NumberRange

from clinic_app import clock, supervision
from clinic_app.i18n import _, lazy_gettext
from clinic_app.storage import alerts as alert_store
from clinic_app.storage import audit, exports, profile, tallies
from clinic_app.storage import stock as stock_store
from clinic_app.storage.db import get_db, write
from clinic_app.surveillance.agegroups import AGE_GROUP_KEYS
from clinic_app.surveillance.isoweek import week_of
from clinic_app.web.api import ApiError
from clinic_app.web.api_tallies import parse_filter, parse_weeks
from clinic_app.web.auth import roles_required
from clinic_app.web.fields import IntegerField
from clinic_app.web.svg_charts import line_chart

bp = Blueprint("supervisor", __name__, url_prefix="/supervisor")

OVERSIGHT = ("supervisor", "admin")
STOCK_EDITORS = ("nurse", "admin")
DEFAULT_WEEKS = 12

# I18N: row labels of the weekly tallies table
ROW_LABELS = {
    "cases": lazy_gettext("Cases"),
    "sev_none": lazy_gettext("No dehydration"),
    "sev_some": lazy_gettext("Some dehydration"),
    "sev_severe": lazy_gettext("Severe dehydration"),
    "plan_a": lazy_gettext("Plan A"),
    "plan_b": lazy_gettext("Plan B"),
    "plan_c": lazy_gettext("Plan C"),
    "plan_sam": lazy_gettext("SAM rehydration"),
    "danger_signs": lazy_gettext("Danger signs"),
    "referrals_urgent": lazy_gettext("Urgent referrals"),
    "referrals_routine": lazy_gettext("Routine referrals"),
    "referrals_completed": lazy_gettext("Referrals made"),
    "dysentery": lazy_gettext("Dysentery"),
    "persistent_diarrhoea": lazy_gettext("Persistent diarrhoea"),
    "severe_acute_malnutrition": lazy_gettext("Severe acute malnutrition"),
    "suspected_cholera": lazy_gettext("Suspected cholera"),
    "outcome_recovered": lazy_gettext("Recovered"),
    "outcome_referred": lazy_gettext("Referred (outcome)"),
    "outcome_admitted": lazy_gettext("Admitted"),
    "outcome_died": lazy_gettext("Died"),
    "outcome_lost": lazy_gettext("Lost to follow-up"),
    "ors_sachets": lazy_gettext("ORS sachets given"),
    "zinc_tablets": lazy_gettext("Zinc tablets given"),
}
QUALITY_LABELS = {
    "ors_given": lazy_gettext("Some or severe dehydration given ORS"),
    "zinc_given": lazy_gettext("Given zinc when advised"),
    "severe_referred_or_plan_c": lazy_gettext("Severe cases referred or on Plan C"),
    "plan_b_reassessed_on_time": lazy_gettext("Plan B reassessed at 4 hours (± 1 hour)"),
    "follow_ups_on_time": lazy_gettext("Follow-ups done on time"),
}
ITEM_LABELS = {"ors_sachets": lazy_gettext("ORS sachets"),
               "zinc_tablets": lazy_gettext("Zinc tablets")}  # fmt: skip


class AcknowledgeForm(FlaskForm):
    # I18N: what the supervisor writes when acknowledging an alert
    comment = TextAreaField(lazy_gettext("Comment"), validators=[DataRequired(), Length(max=500)])


class StockForm(FlaskForm):
    item = SelectField(lazy_gettext("Item"),
                       choices=[SelectChoice(k, v) for k, v in ITEM_LABELS.items()])
    kind = SelectField(lazy_gettext("Entry"), choices=[
        SelectChoice("receipt", lazy_gettext("Receipt")),
        SelectChoice("adjustment", lazy_gettext("Adjustment (+/-)"))])
    quantity = IntegerField(lazy_gettext("Quantity"),
                            validators=[DataRequired(), NumberRange(-100000, 100000)])
    reason = StringField(lazy_gettext("Reason"), validators=[Length(max=200)])  # fmt: skip


def today() -> date:
    return clock.now().date()


def selection():
    """Weeks and filters from the query string; defaults to the last 12 weeks, all cases."""
    args = request.args
    if not args.get("from") or not args.get("to"):
        last = week_of(today())
        args = {**args.to_dict(), "from": str(last.shift(1 - DEFAULT_WEEKS)), "to": str(last)}
    try:
        first, last = parse_weeks(args)
        where = parse_filter(args)
    except ApiError as exc:
        abort(Response(render_template("supervisor/bad_request.html", message=exc.message,
                                       fields=exc.fields), status=400))  # fmt: skip
    return first, last, where


def report_context(conn, first, last, where) -> dict:
    """Everything the tallies page and the weekly PDF show."""
    weeks = tallies.weekly_tallies(conn, first, last, where)
    totals = supervision.sum_weeks(weeks)
    labels = [w["week"] for w in weeks]
    severity_chart = line_chart(
        _("Cases by severity, %(first)s to %(last)s", first=first, last=last), labels,
        {str(ROW_LABELS[k]): [w[k] for w in weeks] for k in ("sev_none", "sev_some", "sev_severe")},
    )  # fmt: skip
    ears_week = supervision.last_complete_week(today())
    ears = supervision.ears_by_area(conn, ears_week)
    by_area = tallies.weekly_counts_by_area(conn, first, last)
    multiples = {area: line_chart(area, labels, {str(ROW_LABELS["cases"]): series}, width=300,
                                  height=120, legend=False)
                 for area, series in sorted(by_area.items())}  # fmt: skip
    return {
        "first": first, "last": last, "where": where, "weeks": weeks, "totals": totals,
        "rows": ROW_LABELS, "quality": supervision.quality_for_period(
            conn, first, last, totals, today(), where),
        "quality_labels": QUALITY_LABELS, "severity_chart": severity_chart,
        "multiples": multiples, "ears": ears, "ears_week": ears_week,
        "open_alerts": alert_store.listing(conn, open_only=True),
    }  # fmt: skip


def low_stock_weeks(conn) -> int:
    """The admin's low-stock threshold, in weeks of stock left (clinic profile)."""
    return profile.load(conn).stock_alert_weeks


def refresh_alerts(conn) -> None:
    with write(conn):
        supervision.refresh_alerts(conn, today(), clock.iso(clock.now()),
                                   low_stock_weeks(conn))  # fmt: skip


@bp.get("/")
@roles_required(*OVERSIGHT)
def index():
    conn = get_db()
    refresh_alerts(conn)
    first, last, where = selection()
    return render_template(
        "supervisor/index.html", **report_context(conn, first, last, where),
        areas=tallies.areas(conn), workers=tallies.workers(conn), age_groups=AGE_GROUP_KEYS,
        args=request.args,
    )  # fmt: skip


@bp.get("/alerts")
@roles_required(*OVERSIGHT)
def alerts():
    conn = get_db()
    refresh_alerts(conn)
    return render_template("supervisor/alerts.html", alerts=alert_store.listing(conn),
                           form=AcknowledgeForm())  # fmt: skip


@bp.post("/alerts/<int:alert_id>/acknowledge")
@roles_required(*OVERSIGHT)
def acknowledge(alert_id: int):
    conn = get_db()
    if alert_store.get(conn, alert_id) is None:
        abort(404)
    form = AcknowledgeForm()
    if not form.validate_on_submit():
        flash(_("Write a comment to acknowledge the alert."), "error")
        return redirect(url_for(".alerts")), 303
    at = clock.iso(clock.now())
    with write(conn):
        if alert_store.acknowledge(conn, alert_id, user_id=g.user["id"], at=at,
                                   comment=form.comment.data.strip()):  # fmt: skip
            audit.record(conn, at=at, user_id=g.user["id"], action="acknowledge",
                         record_type="alert", record_id=str(alert_id))  # fmt: skip
    return redirect(url_for(".alerts")), 303


@bp.route("/supplies", methods=["GET", "POST"])
@roles_required(*OVERSIGHT, "nurse")
def supplies():
    conn = get_db()
    form = StockForm()
    can_edit = g.user["role"] in STOCK_EDITORS
    if request.method == "POST":
        if not can_edit:
            abort(403)
        if form.validate_on_submit() and (form.kind.data == "adjustment"
                                          or form.quantity.data > 0):  # fmt: skip
            at = clock.iso(clock.now())
            with write(conn):
                movement = stock_store.add_movement(
                    conn, at=at, item=form.item.data, kind=form.kind.data,
                    quantity=form.quantity.data, user_id=g.user["id"],
                    reason=(form.reason.data or "").strip(),
                )  # fmt: skip
                audit.record(conn, at=at, user_id=g.user["id"], action="create",
                             record_type="stock_movement", record_id=str(movement))  # fmt: skip
            return redirect(url_for(".supplies")), 303
        flash(_("Enter a whole number; a receipt must be more than zero."), "error")
    low_weeks = low_stock_weeks(conn)
    return render_template(
        "supervisor/supplies.html", form=form, can_edit=can_edit, items=ITEM_LABELS,
        stock=supervision.stock_overview(conn, today(), low_weeks), low_weeks=low_weeks,
        movements=stock_store.recent(conn),
    )  # fmt: skip


def _download(body: bytes | str, filename: str, mimetype: str, record_type: str, first, last):
    conn = get_db()
    at = clock.iso(clock.now())
    with write(conn):
        audit.record(conn, at=at, user_id=g.user["id"], action="export", record_type=record_type,
                     record_id=f"{first}..{last}")  # fmt: skip
    response = Response(body, mimetype=mimetype)
    response.headers["Content-Disposition"] = f'attachment; filename="{filename}"'
    return response


def _csv(header, rows) -> str:
    out = io.StringIO()
    writer = csv.writer(out)
    writer.writerow(header)
    writer.writerows(rows)
    return out.getvalue()


@bp.get("/export/cases.csv")
@roles_required(*OVERSIGHT)
def export_cases():
    first, last, _where = selection()
    rows = exports.case_rows(get_db(), first.monday.isoformat(), last.shift(1).monday.isoformat())
    body = _csv(exports.CASE_COLUMNS, rows)
    return _download(body, f"cases_{first}_{last}.csv", "text/csv", "cases_csv", first, last)


@bp.get("/export/weekly.csv")
@roles_required(*OVERSIGHT)
def export_weekly():
    first, last, where = selection()
    weeks = tallies.weekly_tallies(get_db(), first, last, where)
    body = _csv(("week", *tallies.COUNTERS), ([w["week"], *(w[n] for n in tallies.COUNTERS)]
                                               for w in weeks))  # fmt: skip
    return _download(body, f"weekly_{first}_{last}.csv", "text/csv", "weekly_csv", first, last)


@bp.get("/export/report.pdf")
@roles_required(*OVERSIGHT)
def export_report():
    from clinic_app.pdf import render_pdf  # WeasyPrint is heavy: load it only when printing

    conn = get_db()
    refresh_alerts(conn)
    first, last, where = selection()
    pdf = render_pdf("supervisor/report_pdf.html", **report_context(conn, first, last, where),
                     alerts=alert_store.listing(conn), generated=clock.iso(clock.now()))  # fmt: skip
    return _download(pdf, f"weekly_report_{last}.pdf", "application/pdf", "weekly_report_pdf",
                     first, last)  # fmt: skip


@bp.app_template_filter("share_percent")
def share_percent(share: float | None) -> str:
    return "–" if share is None else f"{share * 100:.0f} %"
