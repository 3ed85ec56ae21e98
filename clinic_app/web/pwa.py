"""The installable app: the web app manifest and the service worker, both public.

The service worker carries the list of shell assets with a content hash of each; the cache
name is derived from those hashes, so any change to an asset changes sw.js and the phone
installs the new version (nobody bumps a version by hand).
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

from flask import Blueprint, current_app, render_template, url_for

from clinic_app.i18n import _
from clinic_app.web import public

bp = Blueprint("pwa", __name__)

# Shell assets besides every JavaScript module under static/js/ (globbed, so a new page
# script or engine module is precached without anyone editing this list).
SHELL_FILES = ("css/app.css", "css/phone.css", "icons/icon.svg", "icons/icon-192.png", "icons/icon-512.png",
               "icons/maskable-512.png")
# The offline caregiver sheet (issue 5): its styles and pictograms. The JSON language catalogs
# are not precached (all seven would be most of the shell); the service worker keeps each one
# the phone has used.
SHEET_GLOBS = ("css/sheet*.css", "icons/sheet/*.svg")
# Pages the worker keeps for offline use (no patient data in them: a blank form and a menu).
OFFLINE_PAGES = ("/", "/assess", "/sheet/offline")


def shell_assets(static_folder: str) -> dict[str, str]:
    """{static path: sha256} of the precached app shell, sorted by path."""
    root = Path(static_folder)
    paths = sorted({*SHELL_FILES, *(p.relative_to(root).as_posix()
                                    for pattern in ("js/**/*.js", *SHEET_GLOBS)
                                    for p in root.glob(pattern))})
    return {path: hashlib.sha256((root / path).read_bytes()).hexdigest()
            for path in paths if (root / path).is_file()}


def shell_version(assets: dict[str, str]) -> str:
    """The cache version: a hash over every asset's path and hash."""
    blob = json.dumps(assets, sort_keys=True, separators=(",", ":")).encode()
    return hashlib.sha256(blob).hexdigest()[:16]


def _shell() -> tuple[dict[str, str], str]:
    # Computed once per process: the assets do not change under a running server.
    cached = current_app.extensions.get("pwa_shell")
    if cached is None or current_app.debug:
        assets = shell_assets(current_app.static_folder)
        cached = current_app.extensions["pwa_shell"] = (assets, shell_version(assets))
    return cached


@bp.get("/manifest.webmanifest")
@public
def manifest():
    icons = [
        {"src": url_for("static", filename="icons/icon-192.png"), "sizes": "192x192",
         "type": "image/png", "purpose": "any"},
        {"src": url_for("static", filename="icons/icon-512.png"), "sizes": "512x512",
         "type": "image/png", "purpose": "any"},
        {"src": url_for("static", filename="icons/maskable-512.png"), "sizes": "512x512",
         "type": "image/png", "purpose": "maskable"},
    ]
    body = {"id": "/", "name": _("Rehydration Desk"), "short_name": _("Rehydration"),
            "start_url": "/?source=app", "scope": "/", "display": "standalone",
            "background_color": "#f6f8f9", "theme_color": "#0b5d7a", "icons": icons}
    response = current_app.response_class(json.dumps(body), mimetype="application/manifest+json")
    response.headers["Cache-Control"] = "no-cache"
    return response


@bp.get("/sw.js")
@public
def service_worker():
    assets, version = _shell()
    urls = [url_for("static", filename=path) for path in assets] + [url_for("pwa.manifest")]
    script = render_template("pwa/sw.js", version=version, shell_json=json.dumps(urls),
                             pages_json=json.dumps(list(OFFLINE_PAGES)))
    response = current_app.response_class(script, mimetype="text/javascript")
    response.headers["Cache-Control"] = "no-cache"
    response.headers["Service-Worker-Allowed"] = "/"
    return response
