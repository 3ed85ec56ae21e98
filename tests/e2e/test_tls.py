"""HTTPS with the clinic's own CA, in Chromium: trusted through an NSS database in a temporary
HOME (as a phone trusts a user-installed CA), the service worker registers, and the device-ready
page passes. A browser without the CA refuses the same server.

Needs Debian's chromium and certutil (libnss3-tools). Only 127.0.0.1 is used.
"""

from __future__ import annotations

import os
import shutil
import ssl
import subprocess
import sys
import time
import urllib.request
from contextlib import contextmanager
from pathlib import Path

import pytest

from clinic_app.demo import STAFF
from tests.e2e.conftest import CHROMIUM, CHROMIUM_ARGS, PHONE, ROOT, LiveServer, free_port

pytestmark = pytest.mark.browser

CERTUTIL = shutil.which("certutil")


class TLSServer(LiveServer):
    """``serve --tls`` in a child process with its own database and certificate folder."""

    def __init__(self, workdir: Path):
        self.https_port = free_port()
        self.certs = workdir / "certs"
        http_port = free_port()
        super().__init__(workdir, extra_env={
            "CLINIC_APP_CERT_DIR": str(self.certs),
            "CLINIC_APP_BACKUP_DIR": str(workdir / "backups"),
            "CLINIC_APP_HOST": "127.0.0.1", "CLINIC_APP_PORT": str(http_port),
            "CLINIC_APP_TLS_PORT": str(self.https_port)})
        self.url = f"https://127.0.0.1:{self.https_port}"
        self.enrol_url = f"http://127.0.0.1:{http_port}/enrol"
        self._flask(["tls", "init", "--ip", "127.0.0.1", "--clinic", "Lukanda Hills"])
        self.ca = self.certs / "tls" / "ca.crt"

    def start(self) -> None:
        with open(self.log, "ab") as log:
            self.proc = subprocess.Popen(
                [sys.executable, "-m", "flask", "--app", "clinic_app", "serve", "--tls"],
                cwd=ROOT, env=self.env, stdout=log, stderr=subprocess.STDOUT)
        context = ssl.create_default_context(cafile=str(self.ca))
        deadline = time.monotonic() + 30
        while time.monotonic() < deadline and self.proc.poll() is None:
            try:
                with urllib.request.urlopen(self.url + "/api/v1/ping", timeout=1,
                                            context=context):
                    return
            except OSError:
                time.sleep(0.1)
        raise RuntimeError(f"serve --tls did not start:\n{self.log.read_text()}")


@pytest.fixture(scope="module")
def tls_server(tmp_path_factory):
    server = TLSServer(tmp_path_factory.mktemp("tls-server"))
    server.start()
    yield server
    server.stop()


@pytest.fixture(scope="module")
def trusting_browser(tmp_path_factory, tls_server, browser):
    """Chromium whose HOME holds an NSS database that trusts the clinic CA, and nothing else."""
    if CERTUTIL is None:
        pytest.fail("certutil is missing: run `make setup` (Debian package libnss3-tools)")
    home = tmp_path_factory.mktemp("home")
    nssdb = home / ".pki" / "nssdb"
    nssdb.mkdir(parents=True)
    subprocess.run([CERTUTIL, "-N", "-d", f"sql:{nssdb}", "--empty-password"], check=True)
    subprocess.run([CERTUTIL, "-A", "-d", f"sql:{nssdb}", "-n", "Lukanda Hills Local CA",
                    "-t", "C,,", "-i", str(tls_server.ca)], check=True)
    # A second Chromium from the suite's one Playwright instance (two instances cannot coexist).
    trusting = browser.browser_type.launch(executable_path=CHROMIUM, headless=True,
                                           args=CHROMIUM_ARGS,
                                           env={**os.environ, "HOME": str(home)})
    yield trusting
    trusting.close()


@contextmanager
def phone(browser):
    """A phone-sized page in a fresh context (no ignore_https_errors: trust must be real)."""
    context = browser.new_context(**PHONE)
    try:
        yield context, context.new_page()
    finally:
        context.close()


def _log_in(page, base_url):
    username, _role, _name, _area, password = STAFF[0]
    page.goto(base_url + "/login")
    page.fill("#username", username)
    page.fill("#password", password)
    page.click("main button[type=submit]")  # the header has a language form too
    page.wait_for_url(base_url + "/")


def test_chromium_trusts_the_clinic_ca_and_the_service_worker_registers(tls_server,
                                                                        trusting_browser):
    with phone(trusting_browser) as (_context, page):
        errors = []
        page.on("pageerror", lambda exc: errors.append(str(exc)))
        response = page.goto(tls_server.url + "/login")
        assert response.status == 200
        assert page.evaluate("window.isSecureContext") is True
        state = page.evaluate("""async () => {
            const registration = await navigator.serviceWorker.register('/sw.js', {scope: '/'});
            const worker = registration.installing || registration.waiting || registration.active;
            if (worker.state !== 'activated') {
              await new Promise((resolve, reject) => {
                worker.addEventListener('statechange', () => {
                  if (worker.state === 'activated') resolve();
                  if (worker.state === 'redundant') reject(new Error('worker became redundant'));
                });
              });
            }
            return {scope: registration.scope, state: worker.state};
        }""")
        assert state == {"scope": tls_server.url + "/", "state": "activated"}
        assert errors == []


def test_the_device_ready_page_passes_after_login_over_https(tls_server, trusting_browser):
    with phone(trusting_browser) as (context, page):
        # Chromium grants persistent storage to installed or well-used sites; a fresh test
        # profile is neither, so the permission is granted as a phone's user would.
        cdp = context.new_cdp_session(page)
        target = cdp.send("Target.getTargetInfo")["targetInfo"]
        cdp.send("Browser.grantPermissions", {
            "origin": tls_server.url, "permissions": ["durableStorage"],
            "browserContextId": target["browserContextId"]})
        _log_in(page, tls_server.url)
        page.goto(tls_server.url + "/enrol/ready")
        page.wait_for_selector("#ready-summary[data-state]", timeout=30_000)
        checks = page.eval_on_selector_all(
            "#ready-checks [data-check]", "items => Object.fromEntries("
            "items.map(i => [i.dataset.check, i.dataset.ok]))")
        assert checks == {"secure": "true", "worker": "true", "storage": "true",
                          "device": "true"}
        assert page.get_attribute("#ready-summary", "data-state") == "ready"


def test_a_browser_without_the_clinic_ca_refuses_the_server(tls_server, browser):
    with phone(browser) as (_context, page):
        with pytest.raises(Exception, match="ERR_CERT_AUTHORITY_INVALID"):
            page.goto(tls_server.url + "/login")


def test_plain_http_offers_only_the_enrolment_page(tls_server, browser):
    with phone(browser) as (_context, page):
        page.goto(tls_server.enrol_url.replace("/enrol", "/login"))
        assert page.url == tls_server.enrol_url
        assert page.is_visible("#ca-download")
        with page.expect_download() as download:
            page.click("#ca-download")
        saved = download.value.path()
        assert Path(saved).read_bytes() == tls_server_ca_der(tls_server)


def tls_server_ca_der(server: TLSServer) -> bytes:
    from clinic_app import tls

    return tls.ca_der(server.ca)
