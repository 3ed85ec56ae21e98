"""The invented demo clinic: one builder for seed-demo, the tests and the browser tests.

Everything here is fiction of our own: the Lukanda Hills district, its villages and its staff.
"""

from __future__ import annotations

import math
import random
import sqlite3
import uuid
from datetime import datetime, timedelta

from clinic_app import clock
from clinic_app.clinical.assess import assess
from clinic_app.clinical.rulebook import RULES
from clinic_app.clinical.types import ClinicSettings
from clinic_app.passwords import hash_password, verify_password
from clinic_app.storage import audit, cases, db, stock, users
from clinic_app.storage import followup as followup_store

DISTRICT = "Lukanda Hills"
CLINIC = "Lukanda Hills Health Post"
VILLAGES = ("Mbeza", "Kantolo", "Siwelo", "Ndaruwa")

# (username, role, display name, area, password)
STAFF = (
    ("amina", "chw", "Amina Tembo", "Mbeza", "demo-chw-amina"),
    ("joseph", "chw", "Joseph Kalulu", "Kantolo", "demo-chw-joseph"),
    ("grace", "nurse", "Grace Nkhoma", "", "demo-nurse-grace"),
    ("tomas", "supervisor", "Tomas Phiri", "", "demo-super-tomas"),
    ("admin", "admin", "Clinic administrator", "", "demo-admin-pass"),
)

# Invented activity for the supervisor's view: who records the cases of each village (never
# amina, whose own lists the browser tests read), how many weeks back, and a rise in one
# village in the last complete week so an unusual-rise alert has something to show.
RECORDED_BY = {"Mbeza": "grace", "Kantolo": "joseph", "Siwelo": "joseph", "Ndaruwa": "grace"}
DEMO_WEEKS = 10
RISE_VILLAGE, RISE_CASES = "Siwelo", 9
# (age in months, weight in kg): ordinary children of those ages, and one adult.
PATIENTS = ((4, 6.2), (9, 8.3), (18, 10.6), (30, 12.9), (48, 15.8), (84, 21.5), (240, 56.0))
WELL = {"condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"}
SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
SEVERE = {"condition": "restless", "eyes": "sunken", "drinking": "poor", "skin_pinch": "very_slow"}
REFERRAL_FACILITY, REFERRAL_TRANSPORT = f"{DISTRICT} District Hospital", "Motorbike ambulance"
# (ORS sachets, zinc tablets) received by the clinic, weeks ago.
RECEIPTS = ((DEMO_WEEKS, 400, 600), (4, 200, 300))


def seed(conn: sqlite3.Connection, *, with_activity: bool = True) -> list[tuple[str, str, str]]:
    """Create the demo staff (and, unless told not to, their invented cases and stock) when
    the database has no users; return (user, role, password)."""
    if users.count(conn):
        return []
    at = clock.iso(clock.system_now())
    with db.write(conn):
        for username, role, name, area, password in STAFF:
            users.create(conn, username=username, role=role, password_hash=hash_password(password),
                         created_at=at, display_name=name, area=area)
        if with_activity:
            seed_activity(conn, clock.now())  # the injected clock in tests
    return [(u, r, p) for u, r, _n, _a, p in STAFF]


def seed_activity(conn: sqlite3.Connection, now: datetime) -> int:
    """Invented closed cases over the last DEMO_WEEKS weeks in every village, and the clinic's
    stock receipts. Call inside a write transaction, after the staff exist; return the number
    of cases."""
    ids = {u: users.by_username(conn, u)["id"] for u in {*RECORDED_BY.values(), "grace"}}
    monday = (now - timedelta(days=now.weekday())).replace(hour=8, minute=0, second=0,
                                                           microsecond=0)
    for weeks_ago, ors, zinc in RECEIPTS:
        at = clock.iso(monday - timedelta(weeks=weeks_ago))
        for item, quantity in (("ors_sachets", ors), ("zinc_tablets", zinc)):
            movement = stock.add_movement(conn, at=at, item=item, kind="receipt",
                                          quantity=quantity, user_id=ids["grace"])
            audit.record(conn, at=at, user_id=ids["grace"], action="create",
                         record_type="stock_movement", record_id=str(movement))
    rng = random.Random(2026)  # the same demo clinic every time
    made = 0
    for weeks_ago in range(DEMO_WEEKS, 0, -1):
        for village, recorder in RECORDED_BY.items():
            count = RISE_CASES if (village, weeks_ago) == (RISE_VILLAGE, 1) else rng.randint(0, 3)
            for _ in range(count):
                moment = monday - timedelta(weeks=weeks_ago, days=-rng.randrange(7),
                                            hours=-rng.randrange(9), minutes=-rng.randrange(60))
                _demo_case(conn, rng, moment, village, ids[recorder], made)
                made += 1
    return made


def _demo_case(conn, rng: random.Random, moment: datetime, village: str, user_id: int,
               n: int) -> None:
    age, weight = rng.choice(PATIENTS)
    # Severe dehydration only in young children: two severe cases aged 2 years or more in one
    # village would (rightly) raise a cholera alert, which this demo does not pretend.
    signs = rng.choices((WELL, SOME, SEVERE if age < 24 else SOME), weights=(6, 3, 1))[0]
    inputs = {"age_months": age, "weight_kg": weight, "signs": dict(signs),
              "sex": rng.choice(("female", "male"))}
    result = assess(inputs, ClinicSettings())
    ors_ml = (result["ors"] or {}).get("total_ml", 0) + (result["home_ors_ml_per_day"] or 0)
    sachets = math.ceil(ors_ml / RULES["sheet_ors_water_ml_per_sachet"]["value"])
    tablets = 0
    if result["zinc"] and rng.random() < 0.9:  # now and then the zinc ran out
        per_day = result["zinc"]["mg_per_day"] / RULES["sheet_zinc_tablet_mg"]["value"]
        tablets = math.ceil(per_day * result["zinc"]["days_max"])
    at = clock.iso(moment)
    raw = {"id": str(uuid.uuid4()), "created_at": at, "area": village, "input": inputs,
           "result": result, "household_ref": f"{village[:2].upper()}-D{n:03d}"}
    referred = result["refer"] != "none"
    cases.upsert(conn, cases.NewCase(
        id=raw["id"], created_at=at, received_at=at, user_id=user_id, device_id=None,
        area=village, input=inputs, result=result, server_result=result,
        payload_hash=cases.payload_hash(raw), ors_sachets=sachets, zinc_tablets=tablets,
        referral_made=referred, household_ref=raw["household_ref"]), raw)
    audit.record(conn, at=at, user_id=user_id, action="case.create", record_type="case",
                 record_id=raw["id"])
    outcome = "referred" if referred else rng.choices(
        ("recovered_home", "lost_to_follow_up"), weights=(12, 1))[0]
    closed = clock.iso(moment + timedelta(hours=4))
    outcome_id = str(uuid.uuid4())
    followup_store.store(conn, "outcome", {
        "id": outcome_id, "case_id": raw["id"], "outcome": outcome, "at": closed,
        "received_at": closed, "user_id": user_id, "device_id": None,
        "referred_to": REFERRAL_FACILITY if referred else None,
        "referred_at": at if referred else None,
        "transport": REFERRAL_TRANSPORT if referred else None, "payload_hash": "demo"}, {})
    audit.record(conn, at=closed, user_id=user_id, action="outcome.create",
                 record_type="outcome", record_id=outcome_id)


def working_logins(conn: sqlite3.Connection) -> list[tuple[str, str, str]]:
    """The demo logins that still work (their account is active and the password unchanged)."""
    working = []
    for username, role, _n, _a, password in STAFF:
        user = users.by_username(conn, username)
        if user and user["active"] and verify_password(user["password_hash"], password):
            working.append((username, role, password))
    return working
