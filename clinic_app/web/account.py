"""A user's own account: choosing a new password after an admin issued a one-time one.

An account created or reset by an admin carries ``must_change_password``; until its owner picks
a password of their own, every page leads here (and the JSON API answers 403), so the password
the admin saw works exactly once.
"""

from __future__ import annotations

from flask import Blueprint, current_app, g, redirect, render_template, request, url_for
from flask_wtf import FlaskForm
from wtforms import PasswordField
from wtforms.validators import DataRequired, EqualTo, Length

from clinic_app import clock
from clinic_app.i18n import _, lazy_gettext
from clinic_app.passwords import hash_password, verify_password
from clinic_app.storage import audit, users
from clinic_app.storage.db import get_db, write

bp = Blueprint("account", __name__, url_prefix="/account")

# What a user who must change their password may still reach.
ALLOWED_ENDPOINTS = {"account.password", "auth.logout", "api.logout", "static"}


class PasswordForm(FlaskForm):
    current = PasswordField(lazy_gettext("Password you were given"),
                            validators=[DataRequired(), Length(max=256)])
    new = PasswordField(lazy_gettext("New password"), validators=[DataRequired(), Length(max=256)])
    confirm = PasswordField(lazy_gettext("New password again"), validators=[
        DataRequired(), EqualTo("new", message=lazy_gettext("The two new passwords differ."))])


def enforce_password_change():
    """Called by the access gate once g.user is known: a response, or None to carry on."""
    user = g.get("user")
    if user is None or not user["must_change_password"]:
        return None
    if request.endpoint in ALLOWED_ENDPOINTS:
        return None
    if request.path.startswith("/api/"):
        from clinic_app.web.api import api_error

        return api_error(403, "password_change_required",
                         _("Choose a new password first (open the app and log in)."))
    return redirect(url_for("account.password"))


@bp.route("/password", methods=["GET", "POST"])
def password():
    form = PasswordForm()
    status = 200
    if form.validate_on_submit():
        minimum = int(current_app.config["PASSWORD_MIN_LENGTH"])
        if not verify_password(g.user["password_hash"], form.current.data):
            form.current.errors.append(_("This is not the password you were given."))
        elif len(form.new.data) < minimum:
            form.new.errors.append(_("Use at least %(n)d characters.", n=minimum))
        elif form.new.data == form.current.data:
            form.new.errors.append(_("Choose a password different from the one you were given."))
        else:
            hashed = hash_password(form.new.data)
            conn = get_db()
            with write(conn):
                users.set_password(conn, g.user["id"], hashed, must_change=False)
                audit.record(conn, at=clock.iso(clock.now()), user_id=g.user["id"],
                             action="password_change", record_type="user",
                             record_id=str(g.user["id"]))
            return redirect(url_for("home.index"))
        status = 400
    elif form.is_submitted():
        status = 400
    return render_template("account/password.html", form=form), status
