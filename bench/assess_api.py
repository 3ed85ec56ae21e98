"""Bench: throughput of POST /api/v1/assess against a bare Flask route on the same server.

The real server (``flask serve``: cheroot, 8 threads) runs in a child process with one extra
route, ``GET /bench/bare``, that answers ``{"ok": true}`` through the same app, gate, session
lookup and security headers. Eight client threads on keep-alive connections, logged in as a
nurse with the CSRF header, send as many requests as they can for a few seconds; bare and
assess rounds alternate and the median of the rounds counts.

- value: assessments answered per second (three inputs in turn: no, some, severe dehydration);
- baseline: bare-route requests per second, same server, same clients, same run;
- ratio value / baseline. Target (our own; issue 3 names none): ratio >= 0.25, i.e. the
  clinical core, its validation and the rulebook cost no more than three bare requests.

Run: ``.venv/bin/python bench/assess_api.py [--seconds S] [--rounds R] [--clients C]``.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import tempfile
import threading
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from bench._common import Session, bench_env, emit, flask, served  # noqa: E402

TARGET_RATIO = 0.25
PASSWORD = "bench-password-1"
INPUTS = [
    {"age_months": 30, "weight_kg": 12.5,
     "signs": {"condition": "well", "eyes": "normal", "drinking": "normal",
               "skin_pinch": "quick"}},
    {"age_months": 14, "weight_kg": 9.5,
     "signs": {"condition": "restless", "eyes": "sunken", "drinking": "eager",
               "skin_pinch": "slow"}},
    {"age_months": 40, "weight_kg": 13,
     "signs": {"condition": "lethargic", "eyes": "sunken", "drinking": "poor",
               "skin_pinch": "very_slow"}},
]


def app_with_bare_route():
    """The clinic app plus the bare baseline route (served only by this bench)."""
    from flask import jsonify

    from clinic_app import create_app
    from clinic_app.web import public

    app = create_app()

    @public
    def bare():
        return jsonify({"ok": True})

    app.add_url_rule("/bench/bare", "bench_bare", bare)
    return app


def load(url: str, clients: int, seconds: float, send) -> float:
    """Requests per second from ``clients`` threads calling ``send(session, i)``."""
    counts = [0] * clients
    sessions = []
    for _ in range(clients):
        session = Session(url)
        session.login("nurse", PASSWORD)
        sessions.append(session)
    stop = time.monotonic() + seconds

    def worker(n: int) -> None:
        i = 0
        while time.monotonic() < stop:
            status = send(sessions[n], i)
            assert status == 200, status
            i += 1
        counts[n] = i

    started = time.monotonic()
    threads = [threading.Thread(target=worker, args=(n,)) for n in range(clients)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join()
    return sum(counts) / (time.monotonic() - started)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seconds", type=float, default=4)
    parser.add_argument("--rounds", type=int, default=3)
    parser.add_argument("--clients", type=int, default=8)
    args = parser.parse_args()

    def bare(session, _i):
        return session.request("GET", "/bench/bare")[0]

    def assess(session, i):
        return session.request("POST", "/api/v1/assess", INPUTS[i % len(INPUTS)])[0]

    with tempfile.TemporaryDirectory() as tmp:
        workdir = Path(tmp)
        flask(["init-db"], bench_env(workdir))
        flask(["add-user", "nurse", "--role", "nurse", "--password", PASSWORD],
              bench_env(workdir))
        with served(workdir, "bench.assess_api:app_with_bare_route()") as url:
            load(url, args.clients, 1, bare)  # warm up both paths
            load(url, args.clients, 1, assess)
            bare_rates, assess_rates = [], []
            for _ in range(args.rounds):
                bare_rates.append(load(url, args.clients, args.seconds, bare))
                assess_rates.append(load(url, args.clients, args.seconds, assess))
    value, baseline = statistics.median(assess_rates), statistics.median(bare_rates)
    ratio = value / baseline
    print(f"assess API: {value:.0f} req/s; bare route: {baseline:.0f} req/s "
          f"(median of {args.rounds} rounds of {args.seconds:g} s, {args.clients} clients)")
    emit("Assessment API throughput (POST /api/v1/assess)", value, "req/s",
         baseline=baseline, ratio=ratio, target=f"ratio >= {TARGET_RATIO}",
         met=ratio >= TARGET_RATIO, note="baseline: bare Flask route, same server")
    return 0


if __name__ == "__main__":
    sys.exit(main())
