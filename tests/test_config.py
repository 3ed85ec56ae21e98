"""Configuration layering and validation."""

from __future__ import annotations

import os

import pytest

from clinic_app import config, create_app


def test_environment_variables_override_defaults_with_their_types():
    out = config.from_environment({"CLINIC_APP_PORT": "9000", "CLINIC_APP_TLS": "true",
                                   "OTHER": "x"})
    assert out == {"PORT": 9000, "TLS": True}


@pytest.mark.parametrize("name,value,message", [
    ("CLINIC_APP_NOPE", "1", "Unknown setting CLINIC_APP_NOPE"),
    ("CLINIC_APP_PORT", "eighty", "must be a whole number"),
    ("CLINIC_APP_TLS", "maybe", "must be true or false"),
])
def test_bad_environment_settings_fail_loudly(name, value, message):
    with pytest.raises(config.ConfigError, match=message):
        config.from_environment({name: value})


def test_the_secret_key_is_generated_once_into_the_instance_folder(tmp_path):
    first = config.secret_key(str(tmp_path))
    assert len(first) == 64
    assert config.secret_key(str(tmp_path)) == first
    assert oct((tmp_path / "secret_key").stat().st_mode & 0o777) == "0o600"


def test_the_database_defaults_to_the_instance_folder(tmp_path):
    app = create_app({"TESTING": True, "SECRET_KEY": "x"})
    assert app.config["DATABASE"].endswith("instance/clinic.sqlite3") or \
        app.config["DATABASE"].endswith("clinic_app-instance/clinic.sqlite3")


def test_tls_makes_the_session_cookie_secure():
    app = create_app({"TESTING": True, "SECRET_KEY": "x", "TLS": True, "DATABASE": ":memory:"})
    assert app.config["SESSION_COOKIE_SECURE"] is True
    assert app.config["SESSION_COOKIE_SAMESITE"] == "Strict"


def test_instance_config_overrides_the_defaults_and_the_environment_overrides_both(
        tmp_path, monkeypatch):
    from flask import Flask

    (tmp_path / "config.py").write_text('PORT = 9001\nHOST = "0.0.0.0"\nSECRET_KEY = "inst"\n')
    for name in [n for n in os.environ if n.startswith(config.PREFIX)]:
        monkeypatch.delenv(name)

    def layered() -> Flask:
        app = Flask("layering", instance_path=str(tmp_path), instance_relative_config=True)
        config.load(app, None)
        return app

    app = layered()
    assert (app.config["PORT"], app.config["HOST"]) == (9001, "0.0.0.0")
    assert app.config["SECRET_KEY"] == "inst"
    assert app.config["DATABASE"] == str(tmp_path / "clinic.sqlite3")
    monkeypatch.setenv("CLINIC_APP_PORT", "9002")
    app = layered()
    assert (app.config["PORT"], app.config["HOST"]) == (9002, "0.0.0.0")
