"""Phone sync: device registration, the exactly-once case upload, and reading one case.

Sync calls authenticate with a device token (``Authorization: Bearer``) plus the custom header
``X-Clinic-Sync: 1``: a cross-site page can send neither without a CORS preflight, which this
server never grants, so the upload is exempt from the form-token check that expires after an hour.
"""

from __future__ import annotations

import re
import uuid
from datetime import datetime

from flask import g, jsonify, request

from clinic_app import clock
from clinic_app.clinical.rulebook import rulebook_version
from clinic_app.i18n import _
from clinic_app.storage import audit, cases, devices
from clinic_app.storage import settings as settings_store
from clinic_app.storage.db import get_db, write
from clinic_app.web import public
from clinic_app.web.api import ApiError, api_error, bp, json_body
from clinic_app.web.csrf import csrf

MAX_BATCH = 500
_TEXT_LIMITS = {"area": 100, "caregiver_language": 35, "household_ref": 64, "note": 2000}


class CaseRejected(ValueError):
    """One case of a batch is not acceptable; the message says why."""


@bp.post("/devices")
def register_device():
    data = request.get_json(silent=True) or {}
    label = data.get("label") if isinstance(data, dict) else None
    label = label.strip()[:100] if isinstance(label, str) else ""
    conn = get_db()
    at = clock.iso(clock.now())
    with write(conn):
        device_id, token = devices.register(conn, g.user["id"], label=label, created_at=at)
        audit.record(conn, at=at, user_id=g.user["id"], action="device.register",
                     record_type="device", record_id=device_id, device_id=device_id)
    return jsonify({"device_id": device_id, "token": token}), 201


def _same_origin(origin: str) -> bool:
    return origin.rstrip("/") == request.host_url.rstrip("/")


def sync_device():
    """The device of an authenticated sync call, or an ApiError (401/403)."""
    header = request.headers.get("Authorization", "")
    if not header.startswith("Bearer ") or not header[7:].strip():
        raise ApiError(401, "token_required", _("This call needs the phone's sync token."))
    device = devices.by_token(get_db(), header[7:].strip())
    # Disabling a user also revokes their phones; those uploads still come in, quarantined.
    # A phone revoked on its own (lost, stolen) of an active user is refused.
    if device is None or (device["revoked_at"] is not None and device["user_active"]):
        raise ApiError(401, "bad_token",
                       _("This phone is not registered or was revoked. Log in again."))
    if request.headers.get("X-Clinic-Sync") != "1":
        raise ApiError(403, "sync_header_required", _("The sync header is missing."))
    if request.mimetype != "application/json":
        raise ApiError(403, "json_required", _("Send the cases as JSON."))
    origin = request.headers.get("Origin")
    if origin is not None and not _same_origin(origin):
        raise ApiError(403, "bad_origin", _("This call must come from the app itself."))
    return device


def sync_batch(field: str) -> tuple:
    """(device, records) of an authenticated sync upload ``{field: [...]}``, or an ApiError."""
    device = sync_device()
    batch = json_body().get(field)
    if not isinstance(batch, list):
        raise ApiError(400, "bad_batch", _('The body must be {"%(field)s": [...]}.', field=field))
    if len(batch) > MAX_BATCH:
        raise ApiError(413, "batch_too_large",
                       _("Send at most %(n)s records at a time.", n=MAX_BATCH))
    return device, batch


def recompute(inputs: dict, settings, rejected: type[Exception]) -> dict:
    """The server's own assessment of uploaded input; ``rejected`` when the input is invalid."""
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import AssessmentInputError

    try:
        return assess(inputs, settings)
    except AssessmentInputError as exc:
        detail = "; ".join(f"{k}: {v}" for k, v in sorted(exc.fields.items()))
        raise rejected(_("The assessment input is not valid (%(detail)s).",
                         detail=detail)) from None


def _text(case: dict, name: str, *, required: bool = False) -> str | None:
    value = case.get(name)
    if value is None and not required:
        return None
    if not isinstance(value, str) or len(value) > _TEXT_LIMITS[name]:
        raise CaseRejected(_("%(field)s must be text of at most %(n)s characters.",
                             field=name, n=_TEXT_LIMITS[name]))
    return value


def _count(value: object, name: str) -> int:
    if value is None:
        return 0
    if isinstance(value, bool) or not isinstance(value, int) or not 0 <= value <= 1000:
        raise CaseRejected(_("given.%(field)s must be a whole number from 0 to 1000.",
                             field=name))
    return value


def _created_at(value: object) -> str:
    if not isinstance(value, str) or not re.match(r"^\d{4}-\d\d-\d\dT", value):
        raise CaseRejected(_("created_at must be an ISO 8601 date and time."))
    try:
        datetime.fromisoformat(value.replace("Z", "+00:00"))
    except ValueError:
        raise CaseRejected(_("created_at must be an ISO 8601 date and time.")) from None
    return value


def _case_id(value: object) -> str:
    try:
        return str(uuid.UUID(value)) if isinstance(value, str) and len(value) == 36 else ""
    except ValueError:
        return ""


def build_case(raw: dict, *, user_id: int, device_id: str | None, user_active: bool,
               received_at: str, settings) -> cases.NewCase:
    """Check one uploaded case and recompute its result; raise CaseRejected when unusable."""
    case_id = _case_id(raw.get("id"))
    if not case_id or case_id != raw.get("id"):
        raise CaseRejected(_("id must be a lower-case UUID."))
    if not isinstance(raw.get("input"), dict) or not isinstance(raw.get("result"), dict):
        raise CaseRejected(_("input and result must be JSON objects."))
    given = raw.get("given") or {}
    if not isinstance(given, dict):
        raise CaseRejected(_("given must be a JSON object."))
    if not isinstance(raw.get("referral_made", False), bool):
        raise CaseRejected(_("referral_made must be true or false."))
    server_result = recompute(raw["input"], settings, CaseRejected)
    return cases.NewCase(
        id=case_id, created_at=_created_at(raw.get("created_at")), received_at=received_at,
        user_id=user_id, device_id=device_id, area=_text(raw, "area") or "",
        input=raw["input"], result=raw["result"], server_result=server_result,
        payload_hash=cases.payload_hash(raw),
        ors_sachets=_count(given.get("ors_sachets"), "ors_sachets"),
        zinc_tablets=_count(given.get("zinc_tablets"), "zinc_tablets"),
        referral_made=bool(raw.get("referral_made", False)),
        caregiver_language=_text(raw, "caregiver_language") or "",
        household_ref=_text(raw, "household_ref"), note=_text(raw, "note"),
        quarantined=not user_active)


def store_case(conn, case: cases.NewCase, raw: dict, *, in_transaction: bool = False) -> str:
    """Upsert one case with its audit entry in one transaction (its own, or the caller's when
    ``in_transaction``); return its status."""
    if not in_transaction:
        with write(conn):
            return store_case(conn, case, raw, in_transaction=True)
    status = cases.upsert(conn, case, raw)
    if status != "duplicate":
        action = {"created": "case.create", "conflict": "case.conflict"}[status]
        audit.record(conn, at=case.received_at, user_id=case.user_id, action=action,
                     record_type="case", record_id=case.id, device_id=case.device_id)
    return status


@bp.post("/cases")
@public
@csrf.exempt
def upload_cases():
    device, batch = sync_batch("cases")
    conn = get_db()
    settings = settings_store.load(conn)
    received_at = clock.iso(clock.now())
    results: list = []
    ready = []
    for raw in batch:
        raw_id = raw.get("id") if isinstance(raw, dict) else None
        try:
            if not isinstance(raw, dict):
                raise CaseRejected(_("Each case must be a JSON object."))
            case = build_case(raw, user_id=device["user_id"], device_id=device["id"],
                              user_active=bool(device["user_active"]),
                              received_at=received_at, settings=settings)
        except CaseRejected as exc:
            results.append({"id": raw_id, "status": "rejected", "error": str(exc)})
            continue
        ready.append((len(results), case, raw))
        results.append(None)
    # One transaction for the whole batch (computed above, outside the write lock): a full or
    # read-only disk stores none of it, and the phone's retry sends it whole again.
    with write(conn):
        for index, case, raw in ready:
            results[index] = {"id": case.id, "error": None,
                              "status": store_case(conn, case, raw, in_transaction=True)}
        devices.touch(conn, device["id"], received_at)
    # The rulebook in force: a phone holding another version fetches it after this sync.
    return jsonify({"results": results, "rulebook_version": rulebook_version(settings)})


@bp.get("/cases/<case_id>")
def get_case(case_id: str):
    conn = get_db()
    row = cases.get_case_for_user(conn, case_id, g.user)
    if row is None:
        return api_error(404, "not_found", _("No such case."))
    with write(conn):
        audit.record(conn, at=clock.iso(clock.now()), user_id=g.user["id"], action="case.view",
                     record_type="case", record_id=row["id"])
    # A re-send that differed (a conflict) never overwrote the case: it is kept for review here.
    body = cases.as_json(row)
    body["conflicts"] = [cases.conflict_json(c) for c in cases.conflicts_for(conn, row["id"])]
    return jsonify(body)
