"""Shared fixtures: the app on a temporary database, a client, a CLI runner, and personas."""

from __future__ import annotations

import pytest

from clinic_app import create_app
from clinic_app.storage import db

PASSWORD = "correct-horse-1"

# One persona per role, plus a second CHW who must never see the first one's records.
PERSONAS = {
    "chw": ("chw", "Mbeza"),
    "chw2": ("chw", "Kantolo"),
    "nurse": ("nurse", ""),
    "supervisor": ("supervisor", ""),
    "admin": ("admin", ""),
}

TEST_CONFIG = {
    "TESTING": True,
    "SECRET_KEY": "test-secret",
    # Cheap hashing keeps the suite fast; production uses the defaults in config.py.
    "ARGON2_TIME_COST": 1,
    "ARGON2_MEMORY_COST": 8,
    "ARGON2_PARALLELISM": 1,
}


@pytest.fixture
def app(tmp_path):
    app = create_app({**TEST_CONFIG, "DATABASE": str(tmp_path / "test.sqlite3")})
    with app.app_context():
        conn = db.connect(app.config["DATABASE"])
        db.migrate(conn)
        conn.close()
    yield app


@pytest.fixture
def client(app):
    return app.test_client()


@pytest.fixture
def runner(app):
    return app.test_cli_runner()


@pytest.fixture
def users(app):
    """Create the personas; return {persona: user id}."""
    from clinic_app.cli import add_user

    ids = {}
    with app.app_context():
        conn = db.connect(app.config["DATABASE"])
        for name, (role, area) in PERSONAS.items():
            ids[name] = add_user(conn, name, role, PASSWORD, display_name=name.title(), area=area)
        conn.close()
    return ids


def login(client, username: str, password: str = PASSWORD) -> str:
    """Log a test client in through the JSON API; return its CSRF token."""
    response = client.post("/api/v1/login", json={"username": username, "password": password})
    assert response.status_code == 200, response.get_json()
    return response.get_json()["csrf_token"]


@pytest.fixture
def as_user(client, users):
    """Log the client in as a persona: ``token = as_user("nurse")``."""
    return lambda persona: login(client, persona)
