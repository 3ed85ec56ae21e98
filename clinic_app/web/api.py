"""The JSON API under /api/v1/. Every error has one shape:
``{"error": {"code": "...", "message": "...", "fields": {...}}}``.
"""

from __future__ import annotations

from functools import wraps

from flask import Blueprint, g, jsonify, request
from flask_wtf.csrf import generate_csrf

from clinic_app import clock
from clinic_app.i18n import _
from clinic_app.web import auth, public
from clinic_app.web.csrf import csrf

bp = Blueprint("api", __name__, url_prefix="/api/v1")


def api_error(status: int, code: str, message: str, fields: dict | None = None):
    """A JSON error response in the API's one shape."""
    response = jsonify({"error": {"code": code, "message": str(message),
                                  "fields": {k: str(v) for k, v in (fields or {}).items()}}})
    response.status_code = status
    return response


def json_body() -> dict:
    """The request's JSON object, or an ApiError when the body is not a JSON object."""
    data = request.get_json(silent=True)
    if not isinstance(data, dict):
        raise ApiError(400, "bad_json", _("The request body must be a JSON object."))
    return data


class ApiError(Exception):
    """Raise inside an API view to answer with the JSON error shape."""

    def __init__(self, status: int, code: str, message: str, fields: dict | None = None):
        super().__init__(message)
        self.status, self.code, self.message, self.fields = status, code, message, fields


@bp.errorhandler(ApiError)
def _api_error(exc: ApiError):
    return api_error(exc.status, exc.code, exc.message, exc.fields)


def api_roles_required(*roles: str):
    """Allow only these roles on an API view; others get 403 in the JSON error shape."""

    def decorator(view):
        @wraps(view)
        def wrapped(*args, **kwargs):
            if g.get("user") is None:
                return api_error(401, "login_required", _("Please log in first."))
            if g.user["role"] not in roles:
                return api_error(403, "forbidden", _("Your role may not do this."))
            return view(*args, **kwargs)
        wrapped.allowed_roles = roles
        return wrapped
    return decorator


def user_json(user) -> dict:
    return {"username": user["username"], "role": user["role"],
            "display_name": user["display_name"], "area": user["area"]}


@bp.get("/ping")
@public
def ping():
    return jsonify({"ok": True, "time": clock.iso(clock.now())})


@bp.post("/login")
@public
@csrf.exempt
def login():
    data = json_body()
    username, password = data.get("username"), data.get("password")
    fields = {}
    if not isinstance(username, str) or not username.strip():
        fields["username"] = _("Enter your user name.")
    if not isinstance(password, str) or not password:
        fields["password"] = _("Enter your password.")
    if fields:
        return api_error(422, "invalid_input", _("Some fields are missing."), fields)
    outcome, user = auth.attempt_login(username.strip(), password)
    if outcome == "throttled":
        return api_error(429, "too_many_attempts",
                         _("Too many failed attempts. Wait a minute and try again."))
    if outcome != "ok":
        return api_error(401, "bad_login", _("Wrong user name or password."))
    auth.start_session(user)
    return jsonify({"user": user_json(user), "csrf_token": generate_csrf()})


@bp.post("/logout")
def logout():
    auth.end_session()
    return jsonify({"ok": True})


@bp.get("/me")
def me():
    return jsonify({"user": user_json(g.user), "csrf_token": generate_csrf()})


# Route modules that extend this blueprint (imported last: they need `bp` defined above).
from clinic_app.web import api_sync  # noqa: E402,F401
from clinic_app.web import openapi  # noqa: E402,F401
from clinic_app.web import api_clinical  # noqa: E402,F401
from clinic_app.web import api_followup  # noqa: E402,F401
from clinic_app.web import api_tallies  # noqa: E402,F401
