"""Crash test: 20 phones upload 5,000 cases while the real server is SIGKILLed three times.

Every case the server acknowledged must be in the database at each crash and at the end, and
after the phones' retries every case must be stored exactly once: 0 lost, 0 duplicated.
"""

from __future__ import annotations

import http.client
import json
import random
import signal
import sqlite3
import threading
import time
import urllib.error
import urllib.request
import uuid

import pytest

from tests.e2e.conftest import LiveServer

CASES = 5000
CLIENTS = 20
BATCH = 25
KILLS = 3
PASSWORD = "crash-test-pass-1"
DEADLINE_SECONDS = 300  # a safety net so a hung server fails the test instead of the suite

SIGNS = [
    {"condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"},
    {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"},
    {"condition": "lethargic", "eyes": "sunken", "drinking": "poor", "skin_pinch": "very_slow"},
]


def post_json(url: str, body: dict, headers: dict, timeout: float = 30) -> tuple[int, dict]:
    request = urllib.request.Request(url, data=json.dumps(body).encode(), method="POST",
                                     headers={"Content-Type": "application/json", **headers})
    try:
        with urllib.request.urlopen(request, timeout=timeout) as response:
            return response.status, json.loads(response.read())
    except urllib.error.HTTPError as exc:
        return exc.code, json.loads(exc.read() or b"{}")


def register_device(server: LiveServer) -> dict:
    """Log in as a CHW through the API and register a phone; return the sync headers."""
    import http.cookiejar

    jar = http.cookiejar.CookieJar()
    opener = urllib.request.build_opener(urllib.request.HTTPCookieProcessor(jar))

    def post(path, body, headers=None):
        request = urllib.request.Request(server.url + path, data=json.dumps(body).encode(),
                                         headers={"Content-Type": "application/json",
                                                  **(headers or {})})
        with opener.open(request, timeout=30) as response:
            return json.loads(response.read())

    csrf = post("/api/v1/login", {"username": "crashchw", "password": PASSWORD})["csrf_token"]
    token = post("/api/v1/devices", {"label": "crash test"}, {"X-CSRFToken": csrf})["token"]
    return {"Authorization": f"Bearer {token}", "X-Clinic-Sync": "1"}


def make_cases(rng: random.Random) -> list[dict]:
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import ClinicSettings

    templates = []
    for signs in SIGNS:
        inputs = {"age_months": 18, "weight_kg": 10.5, "signs": signs}
        templates.append((inputs, assess(inputs, ClinicSettings())))
    cases = []
    for i in range(CASES):
        inputs, result = templates[i % len(templates)]
        cases.append({"id": str(uuid.UUID(int=rng.getrandbits(128), version=4)),
                      "created_at": f"2026-11-{1 + i % 28:02d}T{8 + i % 10:02d}:00:00Z",
                      "area": "Mbeza", "input": inputs, "result": result,
                      "given": {"ors_sachets": i % 3, "zinc_tablets": 10},
                      "referral_made": False, "caregiver_language": "en",
                      "household_ref": f"MB-{i:05d}", "note": None})
    return cases


class Phones:
    """20 client threads sending their share of the cases in batches, retrying until acked."""

    def __init__(self, url: str, headers: dict, cases: list[dict]):
        self.url, self.headers = url + "/api/v1/cases", headers
        self.acked: set[str] = set()
        self.lock = threading.Lock()
        self.retries = 0
        self.problems: list[str] = []
        self.shares = [cases[i::CLIENTS] for i in range(CLIENTS)]
        self.deadline = time.monotonic() + DEADLINE_SECONDS

    def run_one(self, share: list[dict]) -> None:
        for start in range(0, len(share), BATCH):
            batch = share[start:start + BATCH]
            backoff = 0.05
            while True:
                if time.monotonic() > self.deadline:
                    self.problems.append("deadline passed with cases still unsent")
                    return
                try:
                    status, body = post_json(self.url, {"cases": batch}, self.headers)
                except (OSError, ValueError, http.client.HTTPException):
                    status, body = 0, {}  # refused, reset or cut off: the server is down
                if status == 200:
                    break
                with self.lock:
                    self.retries += 1
                time.sleep(backoff)
                backoff = min(backoff * 2, 1.0)
            results = body["results"]
            bad = [r for r in results if r["status"] not in ("created", "duplicate")]
            if bad or [r["id"] for r in results] != [c["id"] for c in batch]:
                self.problems.append(f"unexpected results: {bad[:3]}")
            with self.lock:
                self.acked.update(r["id"] for r in results
                                  if r["status"] in ("created", "duplicate"))

    def guarded(self, share: list[dict]) -> None:
        try:
            self.run_one(share)
        except Exception as exc:  # a dead client thread would look like lost cases
            self.problems.append(f"client thread failed: {exc!r}")

    def start(self) -> list[threading.Thread]:
        threads = [threading.Thread(target=self.guarded, args=(share,), daemon=True)
                   for share in self.shares]
        for thread in threads:
            thread.start()
        return threads

    def acked_now(self) -> set[str]:
        with self.lock:
            return set(self.acked)


def stored_ids(db_path) -> list[str]:
    conn = sqlite3.connect(db_path)
    try:
        return [row[0] for row in conn.execute("SELECT id FROM cases")]
    finally:
        conn.close()


@pytest.mark.slow
def test_no_case_is_lost_or_duplicated_when_the_server_is_killed_three_times(tmp_path):
    seed = random.randrange(2**32)
    rng = random.Random(seed)
    server = LiveServer(tmp_path)
    server._flask(["add-user", "crashchw", "--role", "chw", "--password", PASSWORD])
    db_path = tmp_path / "clinic.sqlite3"
    server.start()
    try:
        phones = Phones(server.url, register_device(server), make_cases(rng))
        sent = {case["id"]: case for share in phones.shares for case in share}
        threads = phones.start()
        # Kill when random shares of the cases have been acknowledged, a random moment later,
        # and only after the restarted server has acknowledged at least one more batch.
        thresholds = sorted(rng.uniform(0.1, 0.7) * CASES for _ in range(KILLS))
        crashes, floor = [], 0
        for threshold in thresholds:
            while (len(phones.acked_now()) < max(threshold, floor + BATCH)
                   and any(t.is_alive() for t in threads)):
                time.sleep(0.005)
            time.sleep(rng.uniform(0, 0.1))
            sending = any(t.is_alive() for t in threads)
            server.proc.send_signal(signal.SIGKILL)
            server.proc.wait()
            acked = phones.acked_now()
            missing_at_crash = acked - set(stored_ids(db_path))
            crashes.append((len(acked), len(missing_at_crash), sending))
            time.sleep(rng.uniform(0, 0.5))
            server.start()
            floor = len(phones.acked_now())
        for thread in threads:
            thread.join(timeout=DEADLINE_SECONDS)
    finally:
        server.stop()

    conn = sqlite3.connect(db_path)
    rows = [r[0] for r in conn.execute("SELECT id FROM cases")]
    creates = dict(conn.execute("SELECT record_id, COUNT(*) FROM audit_log"
                                " WHERE action = 'case.create' GROUP BY record_id"))
    conflicts = conn.execute("SELECT COUNT(*) FROM case_conflicts").fetchone()[0]
    hashes = dict(conn.execute("SELECT id, payload_hash FROM cases"))
    integrity = conn.execute("PRAGMA integrity_check").fetchone()[0]
    conn.close()
    from clinic_app.storage import audit, cases, db

    chain = db.connect(str(db_path))
    broken = audit.verify(chain)
    chain.close()

    lost = len(set(sent) - set(rows))
    duplicated = (len(rows) - len(set(rows))) + sum(n - 1 for n in creates.values() if n > 1)
    acked_lost = len(phones.acked - set(rows))
    print(f"\ncrash test (seed {seed}): sent {len(sent)}, acknowledged {len(phones.acked)}, "
          f"stored {len(set(rows))}, lost {lost}, duplicated {duplicated}, "
          f"acknowledged but lost {acked_lost}, retries {phones.retries}, "
          f"kills {len(crashes)} at acknowledged counts {[a for a, _, _ in crashes]}")
    assert phones.problems == []
    assert len(crashes) == KILLS
    assert [missing for _, missing, _ in crashes] == [0] * KILLS  # acked = durable at crash
    assert all(sending for _, _, sending in crashes)  # every kill hit phones mid-upload
    assert (lost, duplicated, acked_lost) == (0, 0, 0)
    assert len(rows) == CASES and set(rows) == set(sent) == phones.acked
    assert set(creates) == set(sent) and conflicts == 0
    assert all(hashes[i] == cases.payload_hash(sent[i]) for i in sent)
    assert integrity == "ok" and broken is None
