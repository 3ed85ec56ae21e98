"""Friendly, translated error pages; JSON errors under /api/. Never a stack trace."""

from __future__ import annotations

import os
import sqlite3

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


def handle_storage(exc: sqlite3.OperationalError):
    """A full, read-only or locked database: 503 with a plain reason, not a generic 500."""
    from flask import current_app

    text = str(exc).lower()
    path = current_app.config.get("DATABASE") or ""
    if "full" in text:
        code = "storage_full"
        message = _("The clinic computer's disk is full. Nothing was saved. Tell the "
                    "administrator; records waiting on phones are kept and sent again.")
    elif "readonly" in text or "read-only" in text or (path and os.path.exists(path)
                                                       and not os.access(path, os.W_OK)):
        code = "storage_read_only"
        message = _("The clinic database is read-only. Nothing was saved. Tell the "
                    "administrator; records waiting on phones are kept and sent again.")
    elif "locked" in text or "busy" in text:
        code = "storage_busy"
        message = _("The clinic database is busy. Nothing was saved. Try again in a moment.")
    else:
        return handle_unexpected(exc)
    current_app.logger.error("Storage error on %s %s: %s", request.method, request.path, exc)
    return _respond(503, message, code)


def init_app(app) -> None:
    app.register_error_handler(sqlite3.OperationalError, handle_storage)
    app.register_error_handler(CSRFError, handle_csrf)
    app.register_error_handler(HTTPException, handle_http)
    app.register_error_handler(InternalServerError, handle_http)
    app.register_error_handler(Exception, handle_unexpected)
