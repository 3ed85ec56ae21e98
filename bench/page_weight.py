"""Bench: the compressed size of the app shell a phone precaches (issue 4).

Counts exactly what the service worker's install step downloads: every asset listed in the
served /sw.js (gzip level 6, as a web server would send it), plus the two offline pages as
rendered for a logged-in health worker. The rulebook JSON, also fetched at install but data
rather than shell, is printed on its own line.

Targets: 150 KB or less in total, JavaScript 60 KB or less (anchor: the widely cited budget of
about 130-170 KB of critical-path resources for a low-end phone on a slow network).
Run: ``.venv/bin/python bench/page_weight.py``.
"""

from __future__ import annotations

import gzip
import json
import re
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from bench._common import app_with_user  # noqa: E402

TARGET_TOTAL_KB = 150
TARGET_JS_KB = 60


def gz(data: bytes) -> int:
    return len(gzip.compress(data, compresslevel=6))


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        app, _user = app_with_user(tmp, "bench", "chw", "bench-password-1",
                                   display_name="Bench", area="Mbeza")
        client = app.test_client()
        login = client.post("/api/v1/login",
                            json={"username": "bench", "password": "bench-password-1"})
        assert login.status_code == 200, login.get_json()
        script = client.get("/sw.js").get_data(as_text=True)
        shell = json.loads(re.search(r"const SHELL = (\[.*?\]);", script).group(1))
        pages = json.loads(re.search(r"const PAGES = (\[.*?\]);", script).group(1))
        rows = []
        for url in shell + pages:
            response = client.get(url)
            assert response.status_code == 200, url
            body = response.get_data()
            rows.append((url, len(body), gz(body)))
            response.close()
        rulebook = client.get("/api/v1/rulebook").get_data()

    width = max(len(url) for url, _raw, _gz in rows)
    for url, raw, packed in sorted(rows, key=lambda r: -r[2]):
        print(f"{url:<{width}}  {raw / 1024:8.1f} KB raw  {packed / 1024:7.1f} KB gzip")
    total = sum(r[2] for r in rows) / 1024
    js = sum(r[2] for r in rows if r[0].endswith(".js")) / 1024
    print(f"\nshell total (gzip): {total:.1f} KB  target <= {TARGET_TOTAL_KB} KB"
          f"  ratio {total / TARGET_TOTAL_KB:.2f}")
    print(f"JavaScript (gzip):  {js:.1f} KB  target <= {TARGET_JS_KB} KB"
          f"  ratio {js / TARGET_JS_KB:.2f}")
    print(f"rulebook JSON (data, cached at install, not shell): {len(rulebook) / 1024:.1f} KB raw,"
          f" {gz(rulebook) / 1024:.1f} KB gzip")
    print("PASS" if total <= TARGET_TOTAL_KB and js <= TARGET_JS_KB else "OVER BUDGET")


if __name__ == "__main__":
    main()
