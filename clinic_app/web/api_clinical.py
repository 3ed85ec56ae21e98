"""The clinical JSON API: assess (stores nothing) and the rulebook the phones apply."""

from __future__ import annotations

from flask import jsonify

from clinic_app.clinical.assess import assess
from clinic_app.clinical.rulebook import rulebook_json
from clinic_app.clinical.types import AssessmentInputError
from clinic_app.i18n import _
from clinic_app.storage import settings as settings_store
from clinic_app.storage.db import get_db
from clinic_app.web.api import api_error, bp, json_body


def input_error_response(exc: AssessmentInputError):
    """The 422 answer for bad assessment input, one message per bad field."""
    if exc.code == "implausible_weight":
        message = _("The weight looks implausible for this age. Check it, or confirm it if it "
                    "is right.")
    else:
        message = _("Some fields need correcting.")
    return api_error(422, exc.code, message, exc.fields)


@bp.post("/assess")
def assess_route():
    data = json_body()
    try:
        result = assess(data, settings_store.load(get_db()))
    except AssessmentInputError as exc:
        return input_error_response(exc)
    return jsonify(result)


@bp.get("/rulebook")
def rulebook_route():
    response = jsonify(rulebook_json(settings_store.load(get_db())))
    response.headers["Cache-Control"] = "no-cache"
    return response
