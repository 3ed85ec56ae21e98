"""Login, logout, the current user, and the role gates."""

from __future__ import annotations

from datetime import timedelta
from functools import wraps

from flask import (
    Blueprint,
    abort,
    current_app,
    g,
    redirect,
    render_template,
    request,
    session,
    url_for,
)
from flask_wtf import FlaskForm
from flask_wtf.csrf import generate_csrf
from wtforms import PasswordField, StringField
from wtforms.validators import DataRequired, Length

from clinic_app import clock
from clinic_app.i18n import _, lazy_gettext
from clinic_app.passwords import verify_password, verify_unknown_user
from clinic_app.storage import audit, sessions, users
from clinic_app.storage.db import get_db, write
from clinic_app.web import public

bp = Blueprint("auth", __name__)

ROLES = users.ROLES


class LoginForm(FlaskForm):
    # I18N: label of the user-name field on the login page
    username = StringField(lazy_gettext("User name"), validators=[DataRequired(), Length(max=64)])
    # I18N: label of the password field on the login page
    password = PasswordField(lazy_gettext("Password"),
                             validators=[DataRequired(), Length(max=256)])


def client_address() -> str:
    return request.remote_addr or "unknown"


def load_user() -> None:
    """Set g.user from the server-side session named in the signed cookie."""
    g.user = None
    token = session.get("sid")
    if token:
        g.user = sessions.user_for(get_db(), token, clock.iso(clock.now()))
        if g.user is None:
            session.pop("sid", None)


def attempt_login(username: str, password: str) -> tuple[str, object]:
    """Check a login. Returns ("ok", user), ("bad", None) or ("throttled", None)."""
    cfg = current_app.config
    conn = get_db()
    now = clock.now().timestamp()
    window = now - int(cfg["LOGIN_WINDOW_SECONDS"])
    max_user = int(cfg["LOGIN_MAX_FAILURES_PER_ACCOUNT"])
    max_addr = int(cfg["LOGIN_MAX_FAILURES_PER_ADDRESS"])
    address = client_address()
    by_user, by_addr = sessions.recent_failures(conn, username=username, address=address,
                                                since=window)
    if by_user >= max_user or by_addr >= max_addr:
        return "throttled", None
    user = users.by_username(conn, username)
    ok = verify_password(user["password_hash"], password) if user else verify_unknown_user(
        password)
    if ok and user["active"]:
        with write(conn):
            sessions.clear_failures(conn, username, before=window)
        return "ok", user
    with write(conn):
        sessions.record_failure(conn, username, address, now)
    if by_user + 1 >= max_user or by_addr + 1 >= max_addr:
        return "throttled", None
    return "bad", None


def start_session(user) -> None:
    """Open a server-side session for ``user`` and put its token in the signed cookie."""
    conn = get_db()
    moment = clock.now()
    hours = int(current_app.config["SESSION_LIFETIME_HOURS"])
    with write(conn):
        token = sessions.create(conn, user["id"], created_at=clock.iso(moment),
                                expires_at=clock.iso(moment + timedelta(hours=hours)),
                                address=client_address())
        audit.record(conn, at=clock.iso(moment), user_id=user["id"], action="login",
                     record_type="user", record_id=str(user["id"]))
    session.clear()
    session["sid"] = token
    session.permanent = True
    # Mint the form token now: pages and API calls the browser sends in parallel right after
    # login (service-worker precache, device registration) then all share this one token
    # instead of each minting their own and overwriting the cookie.
    generate_csrf()
    current_app.permanent_session_lifetime = timedelta(hours=hours)
    g.user = user


def end_session() -> None:
    token = session.pop("sid", None)
    if token:
        conn = get_db()
        with write(conn):
            sessions.delete(conn, token)
    session.clear()


def login_required(view):
    @wraps(view)
    def wrapped(*args, **kwargs):
        if g.get("user") is None:
            return redirect(url_for("auth.login"))
        return view(*args, **kwargs)
    return wrapped


def roles_required(*roles: str):
    """Allow only these roles; others get 403 (a page, or JSON under /api/)."""
    unknown = set(roles) - set(ROLES)
    if unknown:
        raise ValueError(f"unknown roles {unknown}")

    def decorator(view):
        @wraps(view)
        def wrapped(*args, **kwargs):
            if g.get("user") is None:
                abort(401)
            if g.user["role"] not in roles:
                abort(403)
            return view(*args, **kwargs)
        wrapped.allowed_roles = roles
        return wrapped
    return decorator


def is_local_path(target: str | None) -> bool:
    """True for a path on this server. Browsers read "//x" and "/\\x" as another host."""
    return bool(target) and target.startswith("/") and not target.startswith("//") \
        and "\\" not in target


@bp.route("/login", methods=["GET", "POST"])
@public
def login():
    form = LoginForm()
    status = 200
    if form.validate_on_submit():
        outcome, user = attempt_login(form.username.data.strip(), form.password.data)
        if outcome == "ok":
            target = session.get("next")  # read before start_session clears the session
            start_session(user)
            return redirect(target if is_local_path(target) else url_for("home.index"))
        if outcome == "throttled":
            form.form_errors.append(_("Too many failed attempts. Wait a minute and try again."))
            status = 429
        else:
            form.form_errors.append(_("Wrong user name or password."))
            status = 401
    elif request.method == "POST":
        status = 400
    return render_template("auth/login.html", form=form), status


@bp.route("/logout", methods=["POST"])
@public
def logout():
    end_session()
    return redirect(url_for("auth.login"))
