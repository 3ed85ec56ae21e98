"""Shared by the bench scripts: the output protocol and the real server in a child process.

Protocol (bench/README.md): every measure is one stdout line ``BENCH {json}`` with the keys
measure, value, unit, baseline, ratio, target, met. Any other output is free text.
"""

from __future__ import annotations

import http.client
import json
import os
import socket
import subprocess
import sys
import time
import urllib.request
from contextlib import contextmanager
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PREFIX = "BENCH "


def emit(measure: str, value: float, unit: str, *, target: str, met: bool,
         baseline: float | None = None, ratio: float | None = None, note: str = "") -> None:
    """Print one measure in the protocol's format (and flush: run_all reads a pipe)."""
    line = {"measure": measure, "value": round(value, 4), "unit": unit,
            "baseline": None if baseline is None else round(baseline, 4),
            "ratio": None if ratio is None else round(ratio, 4), "target": target,
            "met": bool(met), "note": note}
    print(PREFIX + json.dumps(line), flush=True)


def app_with_user(tmp: str, username: str, role: str, password: str, **fields):
    """A test-configured app on a fresh database in ``tmp`` with one user: (app, user id)."""
    from clinic_app import create_app
    from clinic_app.cli import add_user
    from clinic_app.storage import db

    app = create_app({"DATABASE": str(Path(tmp) / "bench.sqlite3"), "SECRET_KEY": "bench",
                      "ARGON2_TIME_COST": 1, "ARGON2_MEMORY_COST": 8, "ARGON2_PARALLELISM": 1})
    with app.app_context():
        conn = db.connect(app.config["DATABASE"])
        db.migrate(conn)
        user_id = add_user(conn, username, role, password, **fields)
        conn.close()
    return app, user_id


def free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return sock.getsockname()[1]


def flask(args: list[str], env: dict) -> None:
    subprocess.run([sys.executable, "-m", "flask", "--app", "clinic_app", *args], cwd=ROOT,
                   env=env, check=True, capture_output=True, timeout=300)


def bench_env(workdir: Path) -> dict:
    return {**os.environ, "CLINIC_APP_DATABASE": str(workdir / "bench.sqlite3"),
            "CLINIC_APP_SECRET_KEY": "bench-secret", "CLINIC_APP_ARGON2_TIME_COST": "1",
            "CLINIC_APP_ARGON2_MEMORY_COST": "8", "CLINIC_APP_ARGON2_PARALLELISM": "1",
            "PYTHONPATH": str(ROOT)}


@contextmanager
def served(workdir: Path, app_spec: str = "clinic_app", threads: int = 8):
    """``flask serve`` (cheroot, as in production) in a child process; yields its base URL."""
    env = bench_env(workdir)
    flask(["init-db"], env)
    port = free_port()
    log = open(workdir / "server.log", "ab")
    proc = subprocess.Popen([sys.executable, "-m", "flask", "--app", app_spec, "serve",
                             "--host", "127.0.0.1", "--port", str(port), "--threads",
                             str(threads)], cwd=ROOT, env=env, stdout=log,
                            stderr=subprocess.STDOUT)
    url = f"http://127.0.0.1:{port}"
    try:
        deadline = time.monotonic() + 60
        while True:
            try:
                with urllib.request.urlopen(url + "/api/v1/ping", timeout=1):
                    break
            except OSError:
                if proc.poll() is not None or time.monotonic() > deadline:
                    raise RuntimeError((workdir / "server.log").read_text()) from None
                time.sleep(0.1)
        yield url
    finally:
        proc.terminate()
        proc.wait(timeout=20)
        log.close()


class Session:
    """One keep-alive HTTP connection with a session cookie and the CSRF header."""

    def __init__(self, url: str):
        host, port = url.removeprefix("http://").split(":")
        self.conn = http.client.HTTPConnection(host, int(port), timeout=60)
        self.headers = {"Content-Type": "application/json"}

    def request(self, method: str, path: str, body: object = None,
                headers: dict | None = None) -> tuple[int, bytes]:
        data = None if body is None else json.dumps(body).encode()
        self.conn.request(method, path, body=data, headers={**self.headers, **(headers or {})})
        response = self.conn.getresponse()
        payload = response.read()
        cookie = response.getheader("Set-Cookie")
        if cookie and cookie.startswith("session="):
            self.headers["Cookie"] = cookie.split(";")[0]
        return response.status, payload

    def login(self, username: str, password: str) -> None:
        status, body = self.request("POST", "/api/v1/login",
                                    {"username": username, "password": password})
        assert status == 200, body
        self.headers["X-CSRFToken"] = json.loads(body)["csrf_token"]
