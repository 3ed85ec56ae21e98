"""The web layer: blueprints, the access gate, security headers and error pages."""

from __future__ import annotations

from importlib import import_module

from flask import Flask, current_app, g, redirect, request, session, url_for

# One explicit list: every blueprint module of the app, in registration order.
BLUEPRINTS = [
    "clinic_app.web.auth",
    "clinic_app.web.home",
    "clinic_app.web.api",
    "clinic_app.web.cases",
    "clinic_app.web.sheets",
    "clinic_app.web.pwa",
    "clinic_app.web.assess",
    "clinic_app.web.enrol",
    "clinic_app.web.admin",
    "clinic_app.web.account",
    "clinic_app.web.supervisor",
]

# The content security policy: no inline script or style anywhere.
CSP = ("default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; "
       "font-src 'self'; connect-src 'self'; worker-src 'self'; manifest-src 'self'; "
       "object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'")


def public(view):
    """Mark a view as reachable without logging in (everything else needs a user)."""
    view.is_public = True
    return view


def _gate():
    from clinic_app.web import auth

    if request.endpoint is None:
        return None  # unknown URL: let the 404 handler answer
    if request.endpoint == "static":
        return None
    auth.load_user()
    changing = import_module("clinic_app.web.account").enforce_password_change()
    if changing is not None:
        return changing  # a one-time password must be replaced first (issue 8)
    view = current_app.view_functions.get(request.endpoint)
    if getattr(view, "is_public", False) or g.user is not None:
        return None
    if request.path.startswith("/api/"):
        from clinic_app.i18n import _
        from clinic_app.web.api import api_error

        return api_error(401, "login_required", _("Please log in first."))
    # Remember where a person was going, but only for a page they navigated to: background
    # fetches (the service worker's precache) must not rewrite the session cookie.
    if request.method == "GET" and request.headers.get("Sec-Fetch-Mode", "navigate") == "navigate":
        session["next"] = request.full_path
    return redirect(url_for("auth.login"))


def _security_headers(response):
    response.headers.setdefault("Content-Security-Policy", CSP)
    response.headers.setdefault("X-Content-Type-Options", "nosniff")
    response.headers.setdefault("Referrer-Policy", "same-origin")
    response.headers.setdefault("X-Frame-Options", "DENY")
    response.headers.setdefault("Permissions-Policy", "camera=(), microphone=(), geolocation=()")
    if request.path.startswith("/api/") or (g.get("user") is not None
                                            and response.mimetype == "text/html"):
        response.headers.setdefault("Cache-Control", "no-store")
    return response


def init_app(app: Flask) -> None:
    for name in BLUEPRINTS:
        module = import_module(name)
        app.register_blueprint(module.bp)
    app.before_request(_gate)
    app.after_request(_security_headers)
    import_module("clinic_app.web.errors").init_app(app)
