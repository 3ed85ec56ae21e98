"""Give each test its own instance folder: certificates and backups must never land in the
project's real instance/ folder."""

import pytest


@pytest.fixture
def app(app, tmp_path):
    instance = tmp_path / "instance"
    instance.mkdir()
    app.instance_path = str(instance)
    return app
