"""Phone enrolment: the clinic CA download, its fingerprint, install steps and a QR code.

Public and plain: no login, no patient data. ``serve --tls`` also serves these paths (and only
these) over plain HTTP, because a phone can reach nothing else before it trusts the clinic CA.
"""

from __future__ import annotations

import io
import re

import segno
from flask import Blueprint, Response, current_app, render_template

from clinic_app import serving, tls
from clinic_app.storage import profile
from clinic_app.storage.db import get_db
from clinic_app.web import public

bp = Blueprint("enrol", __name__, url_prefix="/enrol")


def app_origin() -> str:
    """The HTTPS address phones use: the configured fixed address and TLS port."""
    cfg = current_app.config
    return serving.origin(str(cfg["HOST"]), int(cfg["TLS_PORT"]))


def _ca_path():
    return tls.TLSPaths.for_instance(serving.cert_dir(current_app)).ca_cert


def _download_name() -> str:
    name = profile.load(get_db()).clinic_name or "clinic"
    return re.sub(r"[^A-Za-z0-9]+", "-", name).strip("-").lower() + "-ca.crt"


@bp.get("")
@public
def index():
    ca = _ca_path()
    fingerprint = tls.ca_fingerprint_sha256(ca) if ca.exists() else None
    return render_template(
        "enrol/index.html",
        fingerprint=fingerprint,
        # Sixteen pairs per line: easier to compare on a phone screen than one long string.
        fingerprint_lines=[fingerprint[i : i + 48].rstrip(":") for i in range(0, 96, 48)]
        if fingerprint
        else [],
        origin=app_origin(),
        clinic_name=profile.load(get_db()).clinic_name,
    )


@bp.get("/ca.crt")
@public
def ca_certificate():
    ca = _ca_path()
    if not ca.exists():
        return Response("The clinic certificate is not set up yet.\n", 404, mimetype="text/plain")
    # DER with the CA certificate type: Android's installer and iOS's profile prompt both take it.
    response = Response(tls.ca_der(ca), mimetype="application/x-x509-ca-cert")
    response.headers["Content-Disposition"] = f'attachment; filename="{_download_name()}"'
    return response


def enrol_address() -> str:
    """The plain-HTTP address of this page, where a phone starts before it trusts the CA."""
    cfg = current_app.config
    return serving.origin(str(cfg["HOST"]), int(cfg["PORT"]), "http") + "/enrol"


def _qr_svg(text: str) -> Response:
    buffer = io.BytesIO()
    segno.make(text, error="m").save(buffer, kind="svg", scale=6, border=2, xmldecl=False,
                                     title=text)
    return Response(buffer.getvalue(), mimetype="image/svg+xml")


@bp.get("/qr.svg")
@public
def qr_code():
    """QR code of the HTTPS app address (scanned once the CA is installed)."""
    return _qr_svg(app_origin() + "/")


@bp.get("/enrol-qr.svg")
@public
def enrol_qr_code():
    """QR code of this enrolment page's plain-HTTP address (shown on the admin page)."""
    return _qr_svg(enrol_address())


@bp.get("/ready")
@public
def ready():
    return render_template("enrol/ready.html", origin=app_origin())
