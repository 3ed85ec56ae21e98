"""Issue 4: a new app version is offered in the app ("new version ready"), never forced.

A new version is simulated by a small proxy in front of the real server that, on request,
serves a changed service worker script (as a changed asset hash does). Playwright's routing
does not see the browser's own fetch of the worker script, hence the proxy.
"""

from __future__ import annotations

import http.client
import threading
from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer
from urllib.parse import urlsplit

import pytest

from clinic_app.demo import STAFF
from tests.e2e.conftest import CHROMIUM, CHROMIUM_ARGS, PHONE
from tests.e2e.test_offline import poll

pytestmark = pytest.mark.browser

USERNAME, _ROLE, _NAME, _AREA, PASSWORD = STAFF[0]
HOP_BY_HOP = {"connection", "keep-alive", "transfer-encoding", "content-length"}


class Proxy:
    """Forward every request to the server; append a comment to /sw.js once ``changed``."""

    def __init__(self, upstream: str):
        self.changed = False
        target = urlsplit(upstream)
        proxy = self

        class Handler(BaseHTTPRequestHandler):
            def _forward(self):
                length = int(self.headers.get("Content-Length") or 0)
                body = self.rfile.read(length) if length else None
                conn = http.client.HTTPConnection(target.hostname, target.port, timeout=30)
                headers = {k: v for k, v in self.headers.items()
                           if k.lower() not in HOP_BY_HOP}
                conn.request(self.command, self.path, body=body, headers=headers)
                answer = conn.getresponse()
                data = answer.read()
                if proxy.changed and self.path.split("?")[0] == "/sw.js":
                    data += b"\n// next version\n"
                self.send_response(answer.status)
                for key, value in answer.getheaders():
                    if key.lower() not in HOP_BY_HOP:
                        self.send_header(key, value)
                self.send_header("Content-Length", str(len(data)))
                self.end_headers()
                self.wfile.write(data)
                conn.close()

            do_GET = do_POST = do_HEAD = _forward

            def log_message(self, *args):
                pass

        self.server = ThreadingHTTPServer(("127.0.0.1", 0), Handler)
        self.url = f"http://127.0.0.1:{self.server.server_address[1]}"
        threading.Thread(target=self.server.serve_forever, daemon=True).start()

    def close(self):
        self.server.shutdown()
        self.server.server_close()


def test_a_changed_service_worker_is_offered_as_a_new_version_and_taken_on_request(
        live_server, browser, tmp_path):
    proxy = Proxy(live_server.url)
    context = browser.browser_type.launch_persistent_context(
        str(tmp_path / "profile"), executable_path=CHROMIUM, headless=True, args=CHROMIUM_ARGS,
        **PHONE)
    try:
        page = context.pages[0] if context.pages else context.new_page()
        url = proxy.url
        page.goto(url + "/login")
        page.fill("#username", USERNAME)
        page.fill("#password", PASSWORD)
        page.click("main button[type=submit]")
        page.wait_for_url(url + "/")
        poll(page, "() => navigator.serviceWorker.controller !== null")
        assert page.locator("#update-ready").count() == 0

        proxy.changed = True
        page.evaluate("() => navigator.serviceWorker.getRegistration().then(r => r.update())")
        prompt = page.locator("#update-ready")
        prompt.wait_for(state="visible", timeout=40000)
        assert "A new version of the app is ready" in prompt.inner_text()
        # Not forced: the new worker waits until the user agrees.
        assert page.evaluate("() => navigator.serviceWorker.getRegistration()"
                             ".then(r => Boolean(r.waiting))")
        with page.expect_event("load", timeout=40000):
            prompt.locator("button").click()
        poll(page, "() => navigator.serviceWorker.getRegistration()"
                   ".then(r => !r.waiting && Boolean(r.active) && "
                   "navigator.serviceWorker.controller === r.active)")
        assert page.locator("#update-ready").count() == 0
    finally:
        context.close()
        proxy.close()
