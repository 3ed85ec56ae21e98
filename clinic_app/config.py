"""Configuration: package defaults, then instance/config.py, then CLINIC_APP_* variables.

An unknown CLINIC_APP_ key stops the start with a clear message, so a typo in a clinic's
environment never silently falls back to a default.
"""

from __future__ import annotations

import os
import secrets
from pathlib import Path

PREFIX = "CLINIC_APP_"

# Every key here is documented in docs/config.md; tests/test_docs.py compares the two.
DEFAULTS: dict[str, object] = {
    "DATABASE": "",  # empty = <instance>/clinic.sqlite3
    "SECRET_KEY": "",  # empty = generated once into <instance>/secret_key
    "HOST": "127.0.0.1",
    "PORT": 8000,
    "TLS": False,
    "TLS_PORT": 8443,
    "CERT_DIR": "",  # empty = the instance folder (holds tls/ and ca-private/)
    "BACKUP_DIR": "",  # empty = <instance>/backups
    "SESSION_LIFETIME_HOURS": 12,
    "LOGIN_MAX_FAILURES_PER_ACCOUNT": 10,
    "LOGIN_MAX_FAILURES_PER_ADDRESS": 30,
    "LOGIN_WINDOW_SECONDS": 60,
    "PASSWORD_MIN_LENGTH": 8,
    "ARGON2_TIME_COST": 3,
    "ARGON2_MEMORY_COST": 65536,
    "ARGON2_PARALLELISM": 2,
    "DEFAULT_LOCALE": "en",
    "MAX_CONTENT_LENGTH": 8 * 1024 * 1024,
}


class ConfigError(RuntimeError):
    """Raised when the configuration is wrong; the message says what to fix."""


def _coerce(key: str, raw: str) -> object:
    default = DEFAULTS[key]
    if isinstance(default, bool):
        if raw.lower() in ("1", "true", "yes", "on"):
            return True
        if raw.lower() in ("0", "false", "no", "off"):
            return False
        raise ConfigError(f"{PREFIX}{key} must be true or false, not {raw!r}")
    if isinstance(default, int):
        try:
            return int(raw)
        except ValueError:
            raise ConfigError(f"{PREFIX}{key} must be a whole number, not {raw!r}") from None
    return raw


def from_environment(environ: dict[str, str] | None = None) -> dict[str, object]:
    environ = dict(os.environ if environ is None else environ)
    out: dict[str, object] = {}
    for name, raw in environ.items():
        if not name.startswith(PREFIX):
            continue
        key = name[len(PREFIX):]
        if key not in DEFAULTS:
            known = ", ".join(PREFIX + k for k in sorted(DEFAULTS))
            raise ConfigError(f"Unknown setting {name}. Known settings: {known}")
        out[key] = _coerce(key, raw)
    return out


def secret_key(instance_path: str) -> str:
    """Read the instance secret key, generating it once (owner-only file) when missing."""
    path = Path(instance_path) / "secret_key"
    if path.exists():
        return path.read_text().strip()
    key = secrets.token_hex(32)
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    with os.fdopen(fd, "w") as fh:
        fh.write(key)
    return key


def load(app, test_config: dict | None) -> None:
    """Layer the configuration onto ``app.config`` and validate it."""
    app.config.from_mapping(DEFAULTS)
    if test_config is None:
        app.config.from_pyfile("config.py", silent=True)
        app.config.update(from_environment())
    else:
        app.config.update(test_config)
    if not app.config["DATABASE"]:
        app.config["DATABASE"] = os.path.join(app.instance_path, "clinic.sqlite3")
    if not app.config["SECRET_KEY"]:
        app.config["SECRET_KEY"] = secret_key(app.instance_path)
    if int(app.config["PASSWORD_MIN_LENGTH"]) < 8:
        raise ConfigError("PASSWORD_MIN_LENGTH cannot be below 8")
    app.config["SESSION_COOKIE_HTTPONLY"] = True
    app.config["SESSION_COOKIE_SAMESITE"] = "Strict"
    app.config["SESSION_COOKIE_SECURE"] = bool(app.config["TLS"])
    # Send the session cookie only when the session changes. Refreshing it on every response
    # lets a slow response (a service-worker precache started before login) put back an older
    # cookie over a newer one; the server-side session carries the expiry anyway.
    app.config["SESSION_REFRESH_EACH_REQUEST"] = False
    app.config["WTF_CSRF_TIME_LIMIT"] = 3600
    app.config["BABEL_TRANSLATION_DIRECTORIES"] = str(Path(app.root_path).parent / "translations")

