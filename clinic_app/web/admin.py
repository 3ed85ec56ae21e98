"""The admin pages: clinic settings, users, devices, certificate and backup status.

Every change is made in one write transaction together with its audit-log entry.
"""

from __future__ import annotations

import dataclasses
import secrets

from flask import (
    Blueprint,
    abort,
    current_app,
    flash,
    g,
    redirect,
    render_template,
    url_for,
)

from clinic_app import clock, serving, tls
from clinic_app.clinical.rulebook import rulebook_version
from clinic_app.clinical.types import ClinicSettings
from clinic_app.i18n import _, available_locales
from clinic_app.passwords import hash_password
from clinic_app.storage import audit, devices, profile, settings, users
from clinic_app.storage import backup as backups
from clinic_app.storage.db import get_db, write
from clinic_app.web.admin_forms import (
    NewUserForm,
    SettingsForm,
    maintenance_choices,
    plan_b_choices,
)
from clinic_app.web.auth import roles_required
from clinic_app.web.enrol import app_origin, enrol_address

bp = Blueprint("admin", __name__, url_prefix="/admin")

CERT_WARNING_DAYS = 60
# One-time passwords avoid look-alike characters (0/O, 1/l/I): they are read off a screen.
_OTP_ALPHABET = "abcdefghjkmnpqrstuvwxyz23456789"
_CLINICAL_FIELDS = [f.name for f in dataclasses.fields(ClinicSettings)]
_PROFILE_FIELDS = [f.name for f in dataclasses.fields(profile.ClinicProfile)]


def one_time_password() -> str:
    """A random password of 12 characters (about 59 bits) in three groups, e.g. k7mq-2xrt-h9wd."""
    chars = "".join(secrets.choice(_OTP_ALPHABET) for _ in range(12))
    return "-".join(chars[i : i + 4] for i in range(0, 12, 4))


def _audit(conn, action: str, record_type: str, record_id) -> None:
    audit.record(conn, at=clock.iso(clock.now()), user_id=g.user["id"], action=action,
                 record_type=record_type, record_id=str(record_id))


def certificate_status(now) -> dict:
    """What the admin page says about the server certificate and the CA."""
    paths = tls.TLSPaths.for_instance(serving.cert_dir(current_app))
    if not paths.server_cert.exists() or not paths.ca_cert.exists():
        return {"present": False}
    days = tls.days_until_expiry(paths.server_cert, now)
    return {"present": True, "days_left": days, "warn": days <= CERT_WARNING_DAYS,
            "expires": clock.iso(tls.not_after(paths.server_cert)),
            "fingerprint": tls.ca_fingerprint_sha256(paths.ca_cert)}


def backup_status(conn) -> dict:
    """The newest automatic backup (from the backup folder) and the newest manual one."""
    automatic = backups.last_backup_time(serving.backup_dir(current_app))
    manual = backups.last_recorded_backup(conn)
    return {"automatic": clock.iso(automatic) if automatic else None, "manual": manual}


@bp.get("")
@roles_required("admin")
def index():
    conn = get_db()
    return render_template(
        "admin/index.html",
        cert=certificate_status(clock.now()),
        backup=backup_status(conn),
        enrol_url=enrol_address(),
        origin=app_origin(),
        rulebook_version=rulebook_version(settings.load(conn)),
        warning_days=CERT_WARNING_DAYS,
    )


def _clean(value):
    return value.strip() if isinstance(value, str) else value


def _settings_form(current: ClinicSettings, current_profile: profile.ClinicProfile):
    data = {**dataclasses.asdict(current), **dataclasses.asdict(current_profile)}
    data["default_languages"] = list(current_profile.default_languages)
    form = SettingsForm(data=data)
    form.plan_b_table.choices = plan_b_choices()
    form.maintenance_above_20kg_ml_per_kg.choices = maintenance_choices()
    form.default_languages.choices = [(code, code) for code in available_locales()]
    return form


@bp.route("/settings", methods=["GET", "POST"])
@roles_required("admin")
def settings_page():
    conn = get_db()
    current, current_profile = settings.load(conn), profile.load(conn)
    form = _settings_form(current, current_profile)
    if form.validate_on_submit():
        new = dataclasses.replace(current, **{
            name: _clean(form[name].data) for name in _CLINICAL_FIELDS if name in form})
        new_profile = profile.ClinicProfile(
            clinic_name=(form.clinic_name.data or "").strip(),
            clinic_phone=(form.clinic_phone.data or "").strip(),
            stock_alert_weeks=form.stock_alert_weeks.data,
            default_languages=tuple(form.default_languages.data),
        )
        at = clock.iso(clock.now())
        with write(conn):
            if new != current:
                version_id = settings.save(conn, new, user_id=g.user["id"], at=at)
                _audit(conn, "settings_change", "settings", version_id)
            if new_profile != current_profile:
                profile_id = profile.save(conn, new_profile, user_id=g.user["id"], at=at)
                _audit(conn, "profile_change", "clinic_profile", profile_id)
        if new == current and new_profile == current_profile:
            flash(_("Nothing changed."))
        else:
            flash(_("Settings saved. Phones receive the new rulebook at their next sync."))
        return redirect(url_for("admin.settings_page"))
    status = 400 if form.is_submitted() else 200
    return render_template("admin/settings.html", form=form,
                           clinical_fields=_CLINICAL_FIELDS, profile_fields=_PROFILE_FIELDS,
                           rulebook_version=rulebook_version(current),
                           history=settings.history(conn)[:10]), status


@bp.route("/users", methods=["GET", "POST"])
@roles_required("admin")
def users_page():
    conn = get_db()
    form = NewUserForm()
    created = None
    status = 200
    if form.validate_on_submit():
        username = form.username.data.strip()
        if users.by_username(conn, username) is not None:
            form.username.errors.append(_("This user name is already taken."))
            status = 400
        else:
            password = one_time_password()
            hashed = hash_password(password)  # before the transaction: hashing is slow
            with write(conn):
                user_id = users.create(
                    conn, username=username, role=form.role.data, password_hash=hashed,
                    created_at=clock.iso(clock.now()),
                    display_name=(form.display_name.data or "").strip(),
                    area=(form.area.data or "").strip())
                users.set_password(conn, user_id, hashed, must_change=True)
                _audit(conn, "user_create", "user", user_id)
            created = {"username": username, "password": password}
            form = NewUserForm(formdata=None)
    elif form.is_submitted():
        status = 400
    return render_template("admin/users.html", form=form, users=users.all_users(conn),
                           created=created, me=g.user["id"]), status


def _user_or_404(conn, user_id: int):
    user = users.by_id(conn, user_id)
    if user is None:
        abort(404)
    return user


@bp.post("/users/<int:user_id>/disable")
@roles_required("admin")
def disable_user(user_id: int):
    conn = get_db()
    user = _user_or_404(conn, user_id)
    if user["id"] == g.user["id"]:
        flash(_("You cannot disable your own account."))
        return redirect(url_for("admin.users_page"))
    with write(conn):
        users.set_active(conn, user_id, False, clock.iso(clock.now()))
        _audit(conn, "user_disable", "user", user_id)
    flash(_("%(name)s is disabled: their sessions ended and their phones were revoked.",
            name=user["username"]))
    return redirect(url_for("admin.users_page"))


@bp.post("/users/<int:user_id>/enable")
@roles_required("admin")
def enable_user(user_id: int):
    conn = get_db()
    user = _user_or_404(conn, user_id)
    with write(conn):
        users.set_active(conn, user_id, True, clock.iso(clock.now()))
        _audit(conn, "user_enable", "user", user_id)
    flash(_("%(name)s can log in again. Their phones must be registered again.",
            name=user["username"]))
    return redirect(url_for("admin.users_page"))


@bp.post("/users/<int:user_id>/reset-password")
@roles_required("admin")
def reset_password(user_id: int):
    conn = get_db()
    user = _user_or_404(conn, user_id)
    password = one_time_password()
    hashed = hash_password(password)
    with write(conn):
        users.set_password(conn, user_id, hashed, must_change=True)
        _audit(conn, "password_reset", "user", user_id)
    # Rendered once in this response, never flashed: flashed messages sit in the cookie.
    return render_template("admin/password.html", username=user["username"],
                           password=password)


@bp.get("/devices")
@roles_required("admin")
def devices_page():
    return render_template("admin/devices.html", devices=devices.all_devices(get_db()))


@bp.post("/devices/<device_id>/revoke")
@roles_required("admin")
def revoke_device(device_id: str):
    conn = get_db()
    if not any(row["id"] == device_id for row in devices.all_devices(conn)):
        abort(404)
    with write(conn):
        devices.revoke(conn, device_id, clock.iso(clock.now()))
        _audit(conn, "device_revoke", "device", device_id)
    flash(_("The phone's sync token is revoked."))
    return redirect(url_for("admin.devices_page"))
