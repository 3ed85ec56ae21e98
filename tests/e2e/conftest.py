"""Browser tests: the real server (``flask serve``) on a free port, driven by Debian's Chromium.

The server is a separate process so that tests can stop it (leaving Wi-Fi range) and start it
again on the same port and database (coming back).
"""

from __future__ import annotations

import os
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
CHROMIUM = "/usr/bin/chromium"
CHROMIUM_ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking",
                 "--disable-component-update", "--disable-sync", "--disable-quic",
                 "--no-first-run"]
PHONE = {"viewport": {"width": 360, "height": 740}, "has_touch": True, "is_mobile": True,
         "device_scale_factor": 2}


def free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return sock.getsockname()[1]


class LiveServer:
    """``flask --app clinic_app serve`` in a child process, with its own database."""

    def __init__(self, workdir: Path, extra_env: dict[str, str] | None = None):
        self.workdir = workdir
        self.port = free_port()
        self.url = f"http://127.0.0.1:{self.port}"
        self.log = workdir / "server.log"
        self.env = {**os.environ, "CLINIC_APP_DATABASE": str(workdir / "clinic.sqlite3"),
                    "CLINIC_APP_BACKUP_DIR": str(workdir / "backups"),
                    "CLINIC_APP_SECRET_KEY": "browser-test-secret",
                    "CLINIC_APP_ARGON2_TIME_COST": "1", "CLINIC_APP_ARGON2_MEMORY_COST": "8",
                    "CLINIC_APP_ARGON2_PARALLELISM": "1", **(extra_env or {})}
        self.proc: subprocess.Popen | None = None
        self._flask(["seed-demo", "--staff-only"])  # the tests count their own cases

    def _flask(self, args: list[str]) -> None:
        subprocess.run([sys.executable, "-m", "flask", "--app", "clinic_app", *args], cwd=ROOT,
                       env=self.env, check=True, capture_output=True, timeout=120)

    def start(self) -> None:
        with open(self.log, "ab") as log:
            self.proc = subprocess.Popen(
                [sys.executable, "-m", "flask", "--app", "clinic_app", "serve", "--host",
                 "127.0.0.1", "--port", str(self.port)], cwd=ROOT, env=self.env, stdout=log,
                stderr=subprocess.STDOUT)
        deadline = time.monotonic() + 30
        while time.monotonic() < deadline:
            if self.proc.poll() is not None:
                break
            try:
                with urllib.request.urlopen(self.url + "/api/v1/ping", timeout=1):
                    return
            except OSError:
                time.sleep(0.1)
        raise RuntimeError(f"server did not start:\n{self.log.read_text()}")

    def stop(self) -> None:
        if self.proc and self.proc.poll() is None:
            self.proc.terminate()
            try:
                self.proc.wait(timeout=10)
            except subprocess.TimeoutExpired:
                self.proc.kill()
                self.proc.wait()
        self.proc = None


@pytest.fixture
def live_server(tmp_path):
    server = LiveServer(tmp_path)
    server.start()
    yield server
    server.stop()


@pytest.fixture(scope="session")
def browser():
    if not os.path.exists(CHROMIUM):
        pytest.fail(f"{CHROMIUM} is missing: run `make setup` (it installs Debian's chromium)")
    from playwright.sync_api import sync_playwright

    with sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=CHROMIUM, headless=True, args=CHROMIUM_ARGS)
        yield browser
        browser.close()


@pytest.fixture
def page(browser, request):
    context = browser.new_context(**PHONE)
    page = context.new_page()
    errors: list[str] = []
    page.on("console", lambda msg: errors.append(msg.text) if msg.type == "error" else None)
    page.on("pageerror", lambda exc: errors.append(str(exc)))
    page.console_errors = errors
    yield page
    context.close()
