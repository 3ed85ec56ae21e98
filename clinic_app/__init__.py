"""Rehydration Desk: the Flask application factory."""

from __future__ import annotations

import os

from flask import Flask


def create_app(test_config: dict | None = None) -> Flask:
    """Build the app: load and validate the config, then let each subsystem register itself."""
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    app = Flask(__name__, instance_relative_config=True,
                static_folder=os.path.join(root, "static"), static_url_path="/static")
    os.makedirs(app.instance_path, exist_ok=True)

    from clinic_app import cli, config, i18n
    from clinic_app.storage import db
    from clinic_app.web import csrf as csrf_module

    config.load(app, test_config)
    db.init_app(app)
    i18n.init_app(app)
    from clinic_app import web

    web.init_app(app)  # its access gate runs before the CSRF check: anonymous gets 401/302
    csrf_module.csrf.init_app(app)
    cli.init_app(app)
    return app
