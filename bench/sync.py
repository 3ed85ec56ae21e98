"""Bench: syncing 10,000 cases through POST /api/v1/cases against a raw SQLite executemany.

The real server (``flask serve``) runs in a child process. One phone (a registered device
token) sends 10,000 cases in batches of 500, one batch after another on a keep-alive
connection, as the outbox does; the server validates each case, recomputes its assessment,
stores it exactly once and appends its hash-chained audit entry.

- value: wall time of the whole sync, seconds;
- baseline: ``executemany`` of the very rows the sync stored into an empty database with the
  same schema and pragmas, in one transaction, same run;
- ratio value / baseline (printed for scale: the sync does far more work per row).
Target (our own; issue 4 names none): 10,000 cases in 60 s or less on this machine class, a
district's month of records in about a minute.

Run: ``.venv/bin/python bench/sync.py [--cases N] [--batch B]``.
"""

from __future__ import annotations

import argparse
import json
import sqlite3
import sys
import tempfile
import time
import uuid
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from bench._common import Session, bench_env, emit, flask, served  # noqa: E402

TARGET_SECONDS = 60
PASSWORD = "bench-password-1"


def make_cases(n: int) -> list[dict]:
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import ClinicSettings

    templates = []
    for age, weight, signs in ((30, 12.5, ("well", "normal", "normal", "quick")),
                               (14, 9.5, ("restless", "sunken", "eager", "slow")),
                               (40, 13, ("lethargic", "sunken", "poor", "very_slow"))):
        inputs = {"age_months": age, "weight_kg": weight,
                  "signs": dict(zip(("condition", "eyes", "drinking", "skin_pinch"), signs,
                                    strict=True))}
        templates.append((inputs, assess(inputs, ClinicSettings())))
    out = []
    for i in range(n):
        inputs, result = templates[i % len(templates)]
        out.append({"id": str(uuid.uuid4()), "created_at": f"2026-11-{1 + i % 28:02d}T09:00:00Z",
                    "area": f"Village {i % 30:02d}", "input": inputs, "result": result,
                    "given": {"ors_sachets": 2, "zinc_tablets": 10}, "referral_made": False,
                    "caregiver_language": "en", "household_ref": f"H-{i:06d}"})
    return out


def raw_executemany(source: Path, target: Path) -> tuple[float, int]:
    """Seconds to executemany the source's case rows into a fresh database of the same schema."""
    from clinic_app.storage import db

    conn = db.connect(str(target))
    db.migrate(conn)
    conn.execute("ATTACH DATABASE ? AS src", (str(source),))
    conn.execute("INSERT INTO users SELECT * FROM src.users")
    conn.execute("INSERT INTO devices SELECT * FROM src.devices")
    cursor = conn.execute("SELECT * FROM src.cases")
    columns = [d[0] for d in cursor.description]
    rows = cursor.fetchall()
    conn.execute("DETACH DATABASE src")
    sql = (f"INSERT INTO cases ({', '.join(columns)}) "
           f"VALUES ({', '.join('?' * len(columns))})")
    plain = [tuple(row) for row in rows]
    started = time.perf_counter()
    with db.write(conn):
        conn.executemany(sql, plain)
    seconds = time.perf_counter() - started
    count = conn.execute("SELECT COUNT(*) FROM cases").fetchone()[0]
    conn.close()
    return seconds, count


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", type=int, default=10_000)
    parser.add_argument("--batch", type=int, default=500)
    args = parser.parse_args()
    cases = make_cases(args.cases)
    with tempfile.TemporaryDirectory() as tmp:
        workdir = Path(tmp)
        env = bench_env(workdir)
        flask(["init-db"], env)
        flask(["add-user", "chw", "--role", "chw", "--password", PASSWORD], env)
        with served(workdir) as url:
            session = Session(url)
            session.login("chw", PASSWORD)
            status, body = session.request("POST", "/api/v1/devices", {"label": "bench"})
            assert status == 201, body
            phone = Session(url)
            sync_headers = {"Authorization": f"Bearer {json.loads(body)['token']}",
                            "X-Clinic-Sync": "1"}
            started = time.perf_counter()
            for start in range(0, len(cases), args.batch):
                status, body = phone.request("POST", "/api/v1/cases",
                                             {"cases": cases[start:start + args.batch]},
                                             sync_headers)
                assert status == 200, body[:300]
                assert {r["status"] for r in json.loads(body)["results"]} == {"created"}
            value = time.perf_counter() - started
        stored = sqlite3.connect(workdir / "bench.sqlite3").execute(
            "SELECT COUNT(*) FROM cases").fetchone()[0]
        assert stored == args.cases, stored
        baseline, copied = raw_executemany(workdir / "bench.sqlite3", workdir / "raw.sqlite3")
        assert copied == args.cases
    ratio = value / baseline
    print(f"sync of {args.cases:,} cases in batches of {args.batch}: {value:.2f} s "
          f"({args.cases / value:.0f} cases/s); raw executemany: {baseline * 1000:.0f} ms")
    emit(f"Sync of {args.cases:,} cases (POST /api/v1/cases)", value, "s", baseline=baseline,
         ratio=ratio, target=f"<= {TARGET_SECONDS} s", met=value <= TARGET_SECONDS,
         note="baseline: raw SQLite executemany of the same rows")
    return 0


if __name__ == "__main__":
    sys.exit(main())
