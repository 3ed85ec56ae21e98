"""The start page after login: the places each role can go from here."""

from __future__ import annotations

from flask import Blueprint, current_app, g, render_template, url_for

from clinic_app.i18n import lazy_gettext

bp = Blueprint("home", __name__)

ALL = ("chw", "nurse", "supervisor", "admin")

# (endpoint, label, roles). Entries whose endpoint is not registered are skipped, so a
# blueprint adds its own line here and the menu never links to a missing page.
MENU = [
    ("assess.new", lazy_gettext("New assessment"), ALL),
    ("cases.index", lazy_gettext("Cases"), ALL),
    ("cases.due", lazy_gettext("Due now"), ("chw", "nurse")),
    ("supervisor.index", lazy_gettext("Weekly tallies and alerts"), ("supervisor", "admin")),
    ("supervisor.supplies", lazy_gettext("ORS and zinc stock"), ("nurse",)),
    ("admin.index", lazy_gettext("Clinic settings and users"), ("admin",)),
    ("enrol.ready", lazy_gettext("Is this phone ready to work offline?"), ("chw", "nurse")),
]


@bp.get("/")
def index():
    role = g.user["role"]
    menu = [{"url": url_for(endpoint), "label": label}
            for endpoint, label, roles in MENU
            if role in roles and endpoint in current_app.view_functions]
    return render_template("home/index.html", user=g.user, menu=menu)
