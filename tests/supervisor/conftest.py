"""Fixtures of the supervisor tests: a connection and 400 stored synthetic cases."""

from __future__ import annotations

import random

import pytest

from clinic_app.storage import db
from tests.supervisor.synthetic import store, synthetic_case


@pytest.fixture
def conn(app):
    conn = db.connect(app.config["DATABASE"])
    yield conn
    conn.close()


@pytest.fixture
def seeded(app, users, conn):
    """400 synthetic cases stored; returns the list of plain dicts."""
    rng = random.Random(7)
    ids = [users["chw"], users["chw2"], users["nurse"]]
    made = [synthetic_case(rng, n, ids) for n in range(400)]
    for case in made:
        store(conn, case)
    return made
