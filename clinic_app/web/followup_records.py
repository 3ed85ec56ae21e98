"""Building reassessment, monitoring and outcome records from a payload (phone or form), and
the current state of a case (its plan in force, what is due, its fluid balance).

Shared by the HTML pages (cases.py) and the phone API (api_followup.py), so both store the
same rows and apply the same checks.
"""

from __future__ import annotations

import hashlib
import json
import uuid
from datetime import UTC, date, datetime

from clinic_app import clock
from clinic_app.clinical import followup, monitoring
from clinic_app.i18n import _
from clinic_app.storage import audit
from clinic_app.storage import followup as store
from clinic_app.storage.cases import canonical_json
from clinic_app.storage.db import write

TEXT_LIMITS = {"referred_to": 200, "transport": 100}
_PAYLOAD = {
    "reassessment": ("id", "case_id", "assessed_at", "input", "result"),
    "monitoring": ("id", "case_id", "at", "kind", "what", "ml", "cups", "puffy_eyelids",
                   "not_improving"),
    "outcome": ("id", "case_id", "at", "outcome", "referred_to", "referred_at", "transport",
                "followup_date", "improving"),
}
KIND_OF_WHAT = {"ors": "intake", "other": "intake", "stool": "output", "vomit": "output",
                "urine": "output", "check": "check"}


class RecordRejected(ValueError):
    """The payload cannot be stored; the message says why (plain, translatable)."""


def payload_hash(kind: str, raw: dict) -> str:
    payload = {name: raw.get(name) for name in _PAYLOAD[kind]}
    return hashlib.sha256(canonical_json(payload).encode()).hexdigest()


def parse_time(value: object, name: str) -> datetime:
    """An ISO 8601 date-time with a zone (a bare one is read as UTC)."""
    try:
        if not isinstance(value, str) or len(value) < 16:
            raise ValueError
        moment = datetime.fromisoformat(value.replace("Z", "+00:00"))
    except ValueError:
        raise RecordRejected(_("%(field)s must be an ISO 8601 date and time.",
                               field=name)) from None
    return moment if moment.tzinfo else moment.replace(tzinfo=UTC)


def record_id(value: object) -> str:
    try:
        if isinstance(value, str) and str(uuid.UUID(value)) == value:
            return value
    except ValueError:
        pass
    raise RecordRejected(_("id must be a lower-case UUID."))


# --- the state of a case -------------------------------------------------------------------
def current_plan(conn, case) -> tuple[dict, dict, datetime]:
    """(input, server result, started_at) of the assessment in force: the latest
    reassessment, else the case's first assessment."""
    latest = store.latest_reassessment(conn, case["id"])
    if latest is not None:
        return (json.loads(latest["input"]), json.loads(latest["server_result"]),
                parse_time(latest["assessed_at"], "assessed_at"))
    return (json.loads(case["input"]), json.loads(case["server_result"]),
            parse_time(case["created_at"], "created_at"))


def _entries(rows) -> list[dict]:
    return [{"at": parse_time(r["at"], "at"), "kind": r["kind"], "what": r["what"],
             "ml": r["ml"], "cups": r["cups"], "puffy_eyelids": bool(r["puffy_eyelids"]),
             "not_improving": bool(r["not_improving"]), "id": r["id"]} for r in rows]


def case_state(conn, case, settings, now: datetime) -> dict:
    """Plan in force, its schedule and due items, and the fluid balance since it started."""
    inputs, result, started = current_plan(conn, case)
    age = float(inputs["age_months"])
    # Times are compared parsed: the case's own created_at is the phone's spelling.
    entries = [e for e in _entries(store.monitoring_for(conn, case["id"]))
               if e["at"] >= started]
    last = monitoring.last_time(entries)
    balance = monitoring.fluid_balance(
        result, age, [e for e in entries if e["kind"] != "check"], settings.cup_ml,
        puffy_eyelids=any(e["puffy_eyelids"] for e in entries),
        not_improving=any(e["not_improving"] for e in entries))
    closed = case["outcome"] is not None
    due = [] if closed else followup.due_items(result, age, started, last, False, now)
    return {"input": inputs, "result": result, "started_at": started, "age_months": age,
            "schedule": followup.schedule(result, age, started), "due": due,
            "entries": entries, "balance": balance, "closed": closed}


def _iso(moment: datetime) -> str:
    return clock.iso(moment)


# --- building rows -------------------------------------------------------------------------
def build_reassessment(conn, case, raw: dict, *, settings, user_id: int, device_id: str | None,
                       received_at: str) -> dict:
    """Recompute the new signs with the core and compare with the plan in force."""
    from clinic_app.web.api_sync import recompute

    rid = record_id(raw.get("id"))
    assessed = parse_time(raw.get("assessed_at"), "assessed_at")
    if not isinstance(raw.get("input"), dict):
        raise RecordRejected(_("input must be a JSON object."))
    server_result = recompute(raw["input"], settings, RecordRejected)
    phone_result = raw.get("result") if isinstance(raw.get("result"), dict) else server_result
    previous, started = current_plan(conn, case)[1:]
    previous_row = store.latest_reassessment(conn, case["id"])
    step = followup.reassessment(previous, server_result, started, assessed)
    return {"id": rid, "case_id": case["id"],
            "previous_id": previous_row["id"] if previous_row else None,
            "assessed_at": _iso(assessed), "received_at": received_at, "user_id": user_id,
            "device_id": device_id, "input": canonical_json(raw["input"]),
            "result": canonical_json(phone_result),
            "server_result": canonical_json(server_result),
            "engine_mismatch": int(canonical_json(phone_result) != canonical_json(server_result)),
            "payload_hash": payload_hash("reassessment", raw),
            "severity": server_result["severity"], "plan": server_result["plan"],
            "transition": step["transition"], "send_for_iv": int(step["send_for_iv"])}


def _amount(raw: dict, name: str, limit: float) -> float | None:
    value = raw.get(name)
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, int | float) or not 0 <= value <= limit:
        raise RecordRejected(_("%(field)s must be a number from 0 to %(n)s.", field=name,
                               n=limit))
    return value


def build_monitoring(case, raw: dict, *, user_id: int, device_id: str | None,
                     received_at: str) -> dict:
    """One bedside entry: intake (ml or cups), output (stool, vomit, urine) or a check."""
    rid = record_id(raw.get("id"))
    moment = parse_time(raw.get("at"), "at")
    what = raw.get("what")
    if what not in KIND_OF_WHAT:
        raise RecordRejected(_("what must be one of: %(choices)s.",
                               choices=", ".join(KIND_OF_WHAT)))
    kind = KIND_OF_WHAT[what]
    if raw.get("kind") not in (None, kind):
        raise RecordRejected(_("kind does not match what."))
    ml, cups = _amount(raw, "ml", 5000), _amount(raw, "cups", 20)
    if kind == "intake" and ml is None and cups is None:
        raise RecordRejected(_("An intake needs ml or cups."))
    for flag in ("puffy_eyelids", "not_improving"):
        if not isinstance(raw.get(flag, False), bool):
            raise RecordRejected(_("%(field)s must be true or false.", field=flag))
    return {"id": rid, "case_id": case["id"], "at": _iso(moment), "received_at": received_at,
            "user_id": user_id, "device_id": device_id, "kind": kind, "what": what,
            "ml": None if ml is None else int(ml), "cups": cups,
            "puffy_eyelids": int(raw.get("puffy_eyelids", False)),
            "not_improving": int(raw.get("not_improving", False)),
            "payload_hash": payload_hash("monitoring", raw)}


def build_outcome(case, raw: dict, *, user_id: int, device_id: str | None,
                  received_at: str) -> dict:
    """An outcome; "recovered_home" books the follow-up visit its classifications call for
    (unless the payload names a date itself)."""
    rid = record_id(raw.get("id"))
    moment = parse_time(raw.get("at"), "at")
    outcome = raw.get("outcome")
    if outcome not in store.OUTCOMES:
        raise RecordRejected(_("outcome must be one of: %(choices)s.",
                               choices=", ".join(store.OUTCOMES)))
    texts = {}
    for name, limit in TEXT_LIMITS.items():
        value = raw.get(name)
        if value is not None and (not isinstance(value, str) or len(value) > limit):
            raise RecordRejected(_("%(field)s must be text of at most %(n)s characters.",
                                   field=name, n=limit))
        texts[name] = value or None
    referred_at = raw.get("referred_at")
    if referred_at is not None:
        referred_at = _iso(parse_time(referred_at, "referred_at"))
    improving = raw.get("improving")
    if improving is not None and not isinstance(improving, bool):
        raise RecordRejected(_("improving must be true or false."))
    due, reason = _followup_date(case, raw.get("followup_date"), outcome, moment.date(),
                                 improving)
    return {"id": rid, "case_id": case["id"], "outcome": outcome, "at": _iso(moment),
            "received_at": received_at, "user_id": user_id, "device_id": device_id,
            "referred_at": referred_at, "followup_date": due, "followup_reason": reason,
            "payload_hash": payload_hash("outcome", raw), **texts}


def _followup_date(case, given: object, outcome: str, visit: date,
                   improving: bool | None) -> tuple[str | None, str]:
    if given is not None:
        try:
            return date.fromisoformat(str(given)).isoformat(), "chosen"
        except ValueError:
            raise RecordRejected(_("followup_date must be a date (YYYY-MM-DD).")) from None
    if outcome != "recovered_home":
        return None, ""
    planned = followup.followup_visit(json.loads(case["classifications"]), visit,
                                      improving=improving)
    if planned is None:
        return None, ""
    return planned["date"].isoformat(), planned["reason"]


BUILDERS = {"monitoring": build_monitoring, "outcome": build_outcome}


def save(conn, kind: str, row: dict, raw: dict, *, in_transaction: bool = False) -> str:
    """Store a built row with its audit entry in one transaction (its own, or the caller's
    when ``in_transaction``); return its status."""
    if not in_transaction:
        with write(conn):
            return save(conn, kind, row, raw, in_transaction=True)
    status = store.store(conn, kind, row, raw)
    if status != "duplicate":
        audit.record(conn, at=row["received_at"], user_id=row["user_id"],
                     action=f"{kind}.{'create' if status == 'created' else 'conflict'}",
                     record_type=kind, record_id=row["id"], device_id=row.get("device_id"))
    return status
