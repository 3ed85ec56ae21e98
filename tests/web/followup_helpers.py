"""Shared by the follow-up web and API tests: cases stored straight through storage, and a
movable clock."""

from __future__ import annotations

import uuid
from datetime import UTC, datetime

from clinic_app.clinical.assess import assess
from clinic_app.clinical.types import ClinicSettings
from clinic_app.storage import cases, db
from clinic_app.storage.db import write

SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
NONE = {"condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"}
START = datetime(2026, 3, 2, 8, 0, tzinfo=UTC)


class Clock:
    """An injected clock the tests move instead of sleeping."""

    def __init__(self, moment: datetime = START):
        self.moment = moment

    def __call__(self) -> datetime:
        return self.moment


def seed_case(app, user_id: int, *, signs=SOME, created_at: str = "2026-03-02T08:00:00Z",
              household_ref: str = "MB-014", area: str = "Mbeza", **extra) -> str:
    """Store a case as if synced from the user's phone; return its id."""
    inputs = {"age_months": 18, "weight_kg": 10, "signs": signs, **extra}
    result = assess(inputs, ClinicSettings())
    case_id = str(uuid.uuid4())
    raw = {"id": case_id, "created_at": created_at, "input": inputs, "result": result}
    new = cases.NewCase(id=case_id, created_at=created_at, received_at=created_at,
                        user_id=user_id, device_id=None, area=area, input=inputs, result=result,
                        server_result=result, payload_hash=cases.payload_hash(raw),
                        household_ref=household_ref)
    conn = db.connect(app.config["DATABASE"])
    with write(conn):
        cases.upsert(conn, new, raw)
    conn.close()
    return case_id
