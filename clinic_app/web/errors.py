"""Friendly, translated error pages; JSON errors under /api/. Never a stack trace."""

from __future__ import annotations

from flask import render_template, request
from flask_wtf.csrf import CSRFError
from werkzeug.exceptions import HTTPException, InternalServerError

from clinic_app.i18n import _, lazy_gettext

TITLES = {
    400: lazy_gettext("The request could not be understood"),
    401: lazy_gettext("Please log in"),
    403: lazy_gettext("This page is not for your role"),
    404: lazy_gettext("Page not found"),
    405: lazy_gettext("This action is not allowed here"),
    413: lazy_gettext("What was sent is too large"),
    429: lazy_gettext("Too many attempts"),
    500: lazy_gettext("Something went wrong on the clinic server"),
}

CODES = {400: "bad_request", 401: "login_required", 403: "forbidden", 404: "not_found",
         405: "method_not_allowed", 413: "too_large", 415: "unsupported_media_type",
         429: "too_many_requests", 500: "server_error"}


def _respond(status: int, message: str, code: str | None = None):
    if request.path.startswith("/api/"):
        from clinic_app.web.api import api_error

        return api_error(status, code or CODES.get(status, "error"), message)
    title = TITLES.get(status, TITLES[500] if status >= 500 else TITLES[400])
    return render_template("errors/error.html", status=status, title=title,
                           message=message), status


def handle_http(exc: HTTPException):
    status = exc.code or 500
    return _respond(status, str(TITLES.get(status, exc.name)))


def handle_csrf(exc: CSRFError):
    return _respond(400, _("The form expired or was sent from elsewhere. Reload the page and "
                           "try again."), "csrf_failed")


def handle_unexpected(exc: Exception):
    # Logged with its traceback for the administrator; the user sees a plain page.
    from flask import current_app

    current_app.logger.exception("Unhandled error on %s %s", request.method, request.path)
    return _respond(500, str(TITLES[500]))


def init_app(app) -> None:
    app.register_error_handler(CSRFError, handle_csrf)
    app.register_error_handler(HTTPException, handle_http)
    app.register_error_handler(InternalServerError, handle_http)
    app.register_error_handler(Exception, handle_unexpected)
