"""Synthetic cases for the supervisor tests, stored through the real sync storage path.

The cases are spread over 2026-W51 .. 2027-W02 (so across 2026-W53 and the ISO-year
boundary), with device times in several UTC offsets and close to midnight. Every expected
count in the tests is computed from these plain dicts, never from the storage layer.
"""

from __future__ import annotations

import random
from datetime import date, datetime, timedelta

from clinic_app.storage import cases, db

AREAS = ("Mbeza", "Kantolo", "Ruvuma Hill")
FIRST_DAY = date(2026, 12, 14)  # Monday of 2026-W51
DAYS = 35  # to Sunday 2027-01-17, the end of 2027-W02
OFFSETS = ("+03:00", "Z", "-05:00", "+05:30")
SEVERITY_PLAN = {"none": "A", "some": "B", "severe": "C"}
CLASSIFICATION_CHOICES = (
    [], ["dysentery"], ["persistent_diarrhoea"], ["severe_persistent_diarrhoea"],
    ["severe_acute_malnutrition"], ["suspected_cholera"], ["very_severe_disease"],
)  # fmt: skip


def synthetic_case(rng: random.Random, n: int, user_ids: list[int]) -> dict:
    """One plain case dict (the same fields the sync API stores)."""
    day = FIRST_DAY + timedelta(days=rng.randrange(DAYS))
    hour = rng.choice([0, 0, 9, 14, 23])
    created = f"{day.isoformat()}T{hour:02d}:{rng.randrange(60):02d}:00{rng.choice(OFFSETS)}"
    severity = rng.choice(["none", "none", "some", "severe"])
    plan = "SAM" if rng.random() < 0.05 else SEVERITY_PLAN[severity]
    codes = rng.choice(CLASSIFICATION_CHOICES)
    return {
        "id": f"case-{n:05d}",
        "created_at": created,
        "area": rng.choice(AREAS),
        "user_id": rng.choice(user_ids),
        "age_months": rng.choice([0.5, 1.99, 2, 7, 11.99, 12, 30, 59.9, 60, 120, 179.9, 180, 400]),
        "sex": rng.choice(["female", "male", None]),  # as the clinical input spells it
        "severity": severity,
        "plan": plan,
        "refer": rng.choice(["none", "none", "routine", "urgent"]),
        "classifications": codes,
        "zinc": rng.random() < 0.7,
        "ors_sachets": rng.randrange(0, 5),
        "zinc_tablets": rng.choice([0, 10, 14]),
        "referral_made": rng.random() < 0.4,
        "quarantined": rng.random() < 0.05,
        "household_ref": f"HH-SECRET-{n}",
        "note": f"private note {n}",
        "blood_in_stool": "dysentery" in codes,
        "diarrhoea_days": 2,
    }


def store(conn, case: dict) -> None:
    """Store one synthetic case with storage.cases.upsert, as the sync API does."""
    server = {
        "severity": case["severity"], "plan": case["plan"], "refer": case["refer"],
        "classifications": case["classifications"],
        "zinc": {"mg_per_day": 20} if case["zinc"] else None,
        "rulebook_version": "test",
    }  # fmt: skip
    new = cases.NewCase(
        id=case["id"], created_at=case["created_at"], received_at="2027-01-20T08:00:00Z",
        user_id=case["user_id"], device_id=None, area=case["area"],
        input={"age_months": case["age_months"], "sex": case["sex"],
               "blood_in_stool": case["blood_in_stool"], "diarrhoea_days": case["diarrhoea_days"]},
        result=server, server_result=server, payload_hash=f"hash-{case['id']}",
        ors_sachets=case["ors_sachets"], zinc_tablets=case["zinc_tablets"],
        referral_made=case["referral_made"], household_ref=case["household_ref"],
        note=case["note"], quarantined=case["quarantined"],
    )  # fmt: skip
    with db.write(conn):
        cases.upsert(conn, new, {"id": case["id"]})


def local_day(case: dict) -> date:
    return date.fromisoformat(case["created_at"][:10])


def iso_label(day: date) -> str:
    year, week, _ = day.isocalendar()
    return f"{year:04d}-W{week:02d}"



def moment(text: str) -> datetime:
    return datetime.fromisoformat(text)
