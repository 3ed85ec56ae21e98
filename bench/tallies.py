"""Bench: the 12-week tallies request over 1,000,000 cases against a bare SQL GROUP BY.

Seeds N synthetic cases (default 1,000,000) spread over 12 ISO weeks that cross the
2026-W53 / 2027-W01 boundary, then times, in the same run:

- value: ``GET /api/v1/tallies?from=2026-W50&to=2027-W08`` as a supervisor (Flask test client,
  JSON included), median of the runs;
- baseline: a bare ``SELECT week, COUNT(*) ... GROUP BY week`` over the same rows in the cases
  table (the planner picks its own index), median of the runs;
- the supervisor page ``GET /supervisor/`` for the same 12 weeks (target 300 ms).

Target: ratio <= 2 and page <= 300 ms. Not part of the test run:
``.venv/bin/python bench/tallies.py [--cases N] [--runs R]``.
The synthetic JSON payloads are short (about 300 bytes per case), so the database is smaller
than a real one of the same size; the tallies read the trigger-kept daily summary either way.
"""

from __future__ import annotations

import argparse
import json
import random
import statistics
import tempfile
import time
from datetime import timedelta
from pathlib import Path

from clinic_app import create_app
from clinic_app.cli import add_user
from clinic_app.storage import cases, db
from clinic_app.surveillance.isoweek import parse_week

FIRST, LAST = parse_week("2026-W50"), parse_week("2027-W08")
AREAS = [f"Village {n:02d}" for n in range(30)]
BASELINE_SQL = (
    "SELECT CAST((julianday(substr(created_at, 1, 10)) - julianday(:monday)) / 7 AS INTEGER)"
    " AS w, COUNT(*) FROM cases WHERE created_at >= :lo AND created_at < :hi GROUP BY w"
)


def seed(conn, n: int, user_ids: list[int]) -> None:
    rng = random.Random(2026)  # each village has its own health worker (area % workers)
    days = (LAST.sunday - FIRST.monday).days + 1
    batch = []
    for i in range(n):
        day = FIRST.monday + timedelta(days=rng.randrange(days))
        # Roughly a rural district's mix: most cases without dehydration, few severe.
        severity = rng.choices(("none", "some", "severe"), weights=(70, 25, 5))[0]
        area = rng.randrange(len(AREAS))
        server = {"severity": severity, "plan": {"none": "A", "some": "B", "severe": "C"}[severity],
                  "refer": rng.choices(("none", "routine", "urgent"), weights=(85, 10, 5))[0],
                  "classifications": rng.choices(([], ["dysentery"], ["suspected_cholera"]),
                                                 weights=(90, 9, 1))[0],
                  "zinc": {"mg_per_day": 20} if rng.random() < 0.8 else None,
                  "rulebook_version": "bench"}  # fmt: skip
        case = cases.NewCase(
            id=f"bench-{i:07d}", created_at=f"{day}T{rng.randrange(24):02d}:15:00+03:00",
            received_at="2027-03-01T00:00:00Z", user_id=user_ids[area % len(user_ids)],
            device_id=None, area=AREAS[area],
            input={"age_months": rng.choice((rng.uniform(0, 60), rng.uniform(0, 900))),
                   "sex": rng.choice(("female", "male")), "blood_in_stool": False, "diarrhoea_days": 2},
            result=server, server_result=server, payload_hash=f"h{i}",
            ors_sachets=rng.randrange(4), zinc_tablets=rng.choice((0, 10, 14)),
            referral_made=rng.random() < 0.3,
        )  # fmt: skip
        # The storage module's own row builder and INSERT, in batches: one upsert per case
        # would make seeding a million rows take many minutes.
        batch.append(cases._row_values(case))
        if len(batch) == 20_000 or i == n - 1:
            with db.write(conn):
                conn.executemany(cases._INSERT, batch)
            batch = []


def median_ms(action, runs: int) -> float:
    action()  # warm the page cache and the statement cache
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        action()
        times.append((time.perf_counter() - start) * 1000)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", type=int, default=1_000_000)
    parser.add_argument("--runs", type=int, default=15)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        app = create_app({
            "TESTING": True, "SECRET_KEY": "bench", "DATABASE": str(Path(tmp) / "bench.db"),
            "ARGON2_TIME_COST": 1, "ARGON2_MEMORY_COST": 8, "ARGON2_PARALLELISM": 1,
        })  # fmt: skip
        with app.app_context():
            conn = db.connect(app.config["DATABASE"])
            db.migrate(conn)
            workers = [add_user(conn, f"chw{n}", "chw", "bench-password-1") for n in range(12)]
            add_user(conn, "boss", "supervisor", "bench-password-1")
            started = time.perf_counter()
            seed(conn, args.cases, workers)
            print(f"seeded {args.cases:,} cases in {time.perf_counter() - started:.1f} s")
        client = app.test_client()
        login = client.post("/api/v1/login",
                            json={"username": "boss", "password": "bench-password-1"})  # fmt: skip
        assert login.status_code == 200, login.get_json()
        url = f"/api/v1/tallies?from={FIRST}&to={LAST}"
        body = client.get(url).get_json()
        total = sum(w["cases"] for w in body["weeks"])
        params = {"monday": FIRST.monday.isoformat(), "lo": FIRST.monday.isoformat(),
                  "hi": LAST.shift(1).monday.isoformat()}  # fmt: skip
        bare = conn.execute(BASELINE_SQL, params).fetchall()
        assert total == sum(r[1] for r in bare) == args.cases, (total, args.cases)
        assert len(body["weeks"]) == 12 and any(w["week"] == "2026-W53" for w in body["weeks"])

        value = median_ms(lambda: client.get(url).get_json(), args.runs)
        baseline = median_ms(lambda: conn.execute(BASELINE_SQL, params).fetchall(), args.runs)
        page = median_ms(lambda: client.get(f"/supervisor/?from={FIRST}&to={LAST}").data,
                         max(3, args.runs // 3))  # fmt: skip
        conn.close()
    print(json.dumps({"rows": args.cases, "weeks": 12, "runs": args.runs}))
    print(f"value    (12-week GET /api/v1/tallies, median): {value:9.2f} ms")
    print(f"baseline (bare SQL GROUP BY week, median):      {baseline:9.2f} ms")
    print(f"ratio    value / baseline:                      {value / baseline:9.3f}  (target <= 2)")
    print(f"page     (GET /supervisor/, 12 weeks, median):  {page:9.2f} ms  (target <= 300 ms)")


if __name__ == "__main__":
    main()
