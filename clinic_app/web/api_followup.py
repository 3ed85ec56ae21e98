"""Phone sync of what happens after the first assessment: reassessments, monitoring entries
and outcomes, each stored exactly once by its device-made id (the same rules as cases), plus
the "due now" list the phone polls for its reminders.

Sync calls authenticate exactly like ``POST /api/v1/cases`` (device token + X-Clinic-Sync).
"""

from __future__ import annotations

from flask import g, jsonify

from clinic_app import clock
from clinic_app.i18n import _
from clinic_app.storage import cases, devices
from clinic_app.storage import settings as settings_store
from clinic_app.storage.db import get_db, write
from clinic_app.web import followup_records as records
from clinic_app.web import public
from clinic_app.web.api import bp
from clinic_app.web.api_sync import sync_batch
from clinic_app.web.csrf import csrf

# kind -> the body field holding the batch (the outbox's KINDS use the same names).
FIELDS = {"reassessment": "reassessments", "monitoring": "entries", "outcome": "outcomes"}


def _upload(kind: str):
    device, batch = sync_batch(FIELDS[kind])
    conn = get_db()
    settings = settings_store.load(conn)
    received_at = clock.iso(clock.now())
    owner = {"id": device["user_id"], "role": device["role"]}
    # One transaction for the whole batch: a full or read-only disk stores none of it, and the
    # phone's retry sends it whole again.
    with write(conn):
        results = [_one(conn, kind, raw, device, owner, settings, received_at)
                   for raw in batch]
        devices.touch(conn, device["id"], received_at)
    return jsonify({"results": results})


def _one(conn, kind, raw, device, owner, settings, received_at) -> dict:
    raw_id = raw.get("id") if isinstance(raw, dict) else None
    try:
        if not isinstance(raw, dict):
            raise records.RecordRejected(_("Each record must be a JSON object."))
        if not device["user_active"]:
            raise records.RecordRejected(_("This account is disabled; the record was not "
                                           "merged."))
        case_id = raw.get("case_id")
        if not isinstance(case_id, str) or cases.get(conn, case_id) is None:
            # The case may still be on its way (an older phone, a failed batch): keep it queued.
            return {"id": raw_id, "status": "retry",
                    "error": _("The case has not reached the clinic yet.")}
        case = cases.get_case_for_user(conn, case_id, owner)
        if case is None:
            raise records.RecordRejected(_("No such case."))
        common = {"user_id": device["user_id"], "device_id": device["id"],
                  "received_at": received_at}
        if kind == "reassessment":
            row = records.build_reassessment(conn, case, raw, settings=settings, **common)
        else:
            row = records.BUILDERS[kind](case, raw, **common)
    except records.RecordRejected as exc:
        return {"id": raw_id, "status": "rejected", "error": str(exc)}
    return {"id": row["id"], "error": None,
            "status": records.save(conn, kind, row, raw, in_transaction=True)}


@bp.post("/reassessments")
@public
@csrf.exempt
def upload_reassessments():
    return _upload("reassessment")


@bp.post("/monitoring")
@public
@csrf.exempt
def upload_monitoring():
    return _upload("monitoring")


@bp.post("/outcomes")
@public
@csrf.exempt
def upload_outcomes():
    return _upload("outcome")


@bp.get("/due")
def due_now():
    """What is due now in the user's scope: bedside checks, reassessments, follow-up visits."""
    from clinic_app.web.cases import due_lists

    checks, visits = due_lists(get_db(), g.user, clock.now())
    return jsonify({
        "now": clock.iso(clock.now()),
        "items": [{"case_id": item["case"]["id"], "kind": item["kind"],
                   "due_at": clock.iso(item["due_at"]), "due": item["due"], "late": item["late"],
                   "household_ref": item["case"]["household_ref"]} for item in checks],
        "visits": [{"case_id": v["case_id"], "due_date": v["due_date"], "reason": v["reason"],
                    "household_ref": v["household_ref"]} for v in visits],
    })
