"""Configuration layering and validation."""

from __future__ import annotations

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
