"""Caregiver sheets (issue 5): the case sheet as PDF and printable page, the quick sheet, and
the user-interface language chooser.

The caregiver's language (``lang``) is separate from the user-interface language (kept in the
session): the sheet body is rendered under ``force_locale(lang)``.
"""

from __future__ import annotations

import json
from datetime import date, datetime

from flask import (
    Blueprint,
    Response,
    abort,
    current_app,
    g,
    redirect,
    render_template,
    request,
    session,
    url_for,
)
from flask_babel import force_locale
from markupsafe import Markup

from clinic_app import caregiver_sheet, clock, pdf
from clinic_app.i18n import _, available_locales, get_locale, text_direction
from clinic_app.i18n_export import catalog_info
from clinic_app.storage import audit, db, profile
from clinic_app.storage import settings as settings_store
from clinic_app.web import public
from clinic_app.web.auth import is_local_path

bp = Blueprint("sheets", __name__)

TEMPLATE = "sheets/sheet.html"
STYLESHEETS = ("css/sheet.css",)
USER_AGENT_SHEET = "css/sheet-ua.css"  # in place of WeasyPrint's HTML sheet (see the file)


def language_choices(selected: str) -> list[dict]:
    """Every language with its own name and, unless reviewed, the draft notice."""
    from babel import Locale

    return [{"code": code, "name": Locale.parse(code).get_display_name(code),
             "draft": catalog_info(code).draft, "selected": code == selected}
            for code in available_locales()]


def _clinic(conn) -> caregiver_sheet.ClinicInfo:
    found = profile.load(conn)
    return caregiver_sheet.ClinicInfo(name=found.clinic_name, phone=found.clinic_phone)


def _choice(value: str | None, allowed, default: str) -> str:
    if value in (None, ""):
        return default
    if value not in allowed:
        abort(400, description=_("This choice is not available."))
    return value


def _sheet_options(default_lang: str) -> tuple[str, str]:
    lang = _choice(request.args.get("lang") or request.form.get("lang"), available_locales(),
                   default_lang if default_lang in available_locales() else "en")
    size = _choice(request.args.get("size") or request.form.get("size"),
                   caregiver_sheet.PAGE_SIZES, "a4")
    return lang, size


def _render(sheet: dict, lang: str, size: str, *, toolbar: dict | None = None) -> str:
    # The screen toolbar speaks the user's interface language; the sheet the caregiver's.
    # (``?lang=`` names the caregiver's language here, so the session decides the interface.)
    toolbar_html = None
    if toolbar:
        ui_lang = _ui_locale()
        with force_locale(ui_lang):
            toolbar_html = Markup(render_template("sheets/_toolbar.html", toolbar=toolbar,
                                                  ui_lang=ui_lang,
                                                  ui_dir=text_direction(ui_lang)))
    with force_locale(lang):
        return render_template(TEMPLATE, s=sheet, lang=lang, dir=text_direction(lang),
                               size=size, toolbar_html=toolbar_html)


def sheet_pdf(sheet: dict, lang: str, size: str) -> bytes:
    """The sheet as PDF bytes, in the caregiver's language (call inside a request context)."""
    # A5 is A4 scaled by 1/sqrt(2): the one-page A4 layout, zoomed, fills an A5 page exactly.
    layout, zoom = ("a4", 2 ** -0.5) if size == "a5" else (size, 1)
    with force_locale(lang):
        return pdf.render_pdf(TEMPLATE, stylesheets=STYLESHEETS, zoom=zoom,
                              user_agent=USER_AGENT_SHEET, s=sheet, lang=lang,
                              dir=text_direction(lang), size=layout, toolbar_html=None)


def _ui_locale() -> str:
    locales = available_locales()
    if session.get("lang") in locales:
        return session["lang"]
    return request.accept_languages.best_match(locales) or current_app.config["DEFAULT_LOCALE"]


def _build(result: dict, age_months: float, lang: str, seen_on: date, conn,
           settings=None, clinic=None) -> dict:
    return caregiver_sheet.build(result, age_months=age_months,
                                 settings=settings if settings is not None else settings_store.load(conn), locale=lang,
                                 seen_on=seen_on, clinic=clinic if clinic is not None else _clinic(conn))


def _pdf_response(data: bytes, name: str) -> Response:
    return Response(data, mimetype="application/pdf",
                    headers={"Content-Disposition": f'inline; filename="{name}.pdf"',
                             "Cache-Control": "no-store"})


def _audit(conn, action: str, case_id: str) -> None:
    with db.write(conn):
        audit.record(conn, at=clock.iso(clock.now()), user_id=g.user["id"], action=action,
                     record_type="case", record_id=case_id)


def _case_or_404(conn, case_id: str):
    from clinic_app.storage import cases

    case = cases.get_case_for_user(conn, case_id, g.user)
    if case is None:
        abort(404)
    return case


def _case_sheet(case, lang: str, conn, settings=None, clinic=None) -> dict:
    result = json.loads(case["server_result"] or case["result"])
    seen_on = datetime.fromisoformat(case["created_at"].replace("Z", "+00:00")).date()
    return _build(result, case["age_months"], lang, seen_on, conn, settings, clinic)


@bp.get("/cases/<case_id>/sheet.pdf")
def case_pdf(case_id: str):
    conn = db.get_db()
    case = _case_or_404(conn, case_id)
    lang, size = _sheet_options(case["caregiver_language"])
    settings, clinic = settings_store.load(conn), _clinic(conn)
    key = (case_id, case["payload_hash"], lang, size,
           caregiver_sheet.settings_version(settings, clinic))
    data, _hit = pdf.cache.get_or_render(
        key, lambda: sheet_pdf(_case_sheet(case, lang, conn, settings, clinic), lang, size))
    _audit(conn, "sheet_print", case_id)
    return _pdf_response(data, f"sheet-{lang}-{size}")


@bp.get("/cases/<case_id>/sheet")
def case_sheet(case_id: str):
    conn = db.get_db()
    case = _case_or_404(conn, case_id)
    lang, size = _sheet_options(case["caregiver_language"])
    _audit(conn, "sheet_view", case_id)
    toolbar = {"languages": language_choices(lang), "size": size, "lang": lang,
               "pdf": {s: url_for("sheets.case_pdf", case_id=case_id, lang=lang, size=s)
                       for s in caregiver_sheet.PAGE_SIZES},
               "action": url_for("sheets.case_sheet", case_id=case_id)}
    return _render(_case_sheet(case, lang, conn), lang, size, toolbar=toolbar)


@bp.get("/sheet/offline")
def offline():
    """The page that draws a case's sheet on the phone from the copy kept there."""
    conn = db.get_db()
    return render_template("sheets/offline.html", clinic=_clinic(conn),
                           languages=language_choices(_ui_locale()))


def _quick_input() -> dict:
    """The assessment input of the quick sheet: a JSON body or the small form's fields."""
    if request.is_json:
        body = request.get_json(silent=True)
        return body.get("input", body) if isinstance(body, dict) else {}
    form = request.form
    raw = {"age_months": form.get("age_months", ""), "weight_kg": form.get("weight_kg", ""),
           "signs": {k: form.get(k, "") for k in ("condition", "eyes", "drinking",
                                                   "skin_pinch")}}
    out: dict = {"signs": {k: v for k, v in raw["signs"].items() if v}}
    for key in ("age_months", "weight_kg"):
        if raw[key].strip():
            try:
                out[key] = float(raw[key].replace(",", "."))
            except ValueError:
                out[key] = raw[key]
    return out


@bp.route("/sheet/quick", methods=["GET", "POST"])
def quick():
    conn = db.get_db()
    ui_lang = str(session.get("lang") or "en")
    if request.method == "GET":
        return render_template("sheets/quick.html", languages=language_choices(ui_lang),
                               errors={}, values={})
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import AssessmentInputError

    body = request.get_json(silent=True) if request.is_json else None
    options = body if isinstance(body, dict) else request.form
    lang = _choice(options.get("lang"), available_locales(), "en")
    size = _choice(options.get("size"), caregiver_sheet.PAGE_SIZES, "a4")
    inputs = _quick_input()
    try:
        result = assess(inputs, settings_store.load(conn))
    except AssessmentInputError as error:
        return render_template("sheets/quick.html", languages=language_choices(lang),
                               errors=error.fields, values=request.form), 422
    sheet = _build(result, float(inputs["age_months"]), lang, clock.now().date(), conn)
    if options.get("format") == "pdf":
        return _pdf_response(sheet_pdf(sheet, lang, size),
                             f"quick-sheet-{lang}-{size}")
    return _render(sheet, lang, size)


@bp.app_context_processor
def _language_context():
    return {"ui_languages": lambda: language_choices(str(get_locale() or "en"))}


@bp.post("/language")
@public
def choose_language():
    """Set the user-interface language for this session (the sheets choose their own)."""
    lang = request.form.get("lang", "")
    if lang in available_locales():
        session["lang"] = lang
    target = request.form.get("next") or ""
    if not is_local_path(target):
        target = url_for("home.index")
    return redirect(target)
