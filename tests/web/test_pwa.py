"""The installable app: manifest, service worker headers and the asset-hash cache name."""

from __future__ import annotations

from clinic_app.web.pwa import shell_assets, shell_version


def test_the_manifest_names_the_app_and_its_icons(client):
    response = client.get("/manifest.webmanifest")
    assert response.status_code == 200
    assert response.mimetype == "application/manifest+json"
    manifest = response.get_json(force=True)
    assert manifest["display"] == "standalone" and manifest["scope"] == "/"
    assert manifest["start_url"].startswith("/")
    sizes = {(icon["sizes"], icon["purpose"]) for icon in manifest["icons"]}
    assert {("192x192", "any"), ("512x512", "any"), ("512x512", "maskable")} <= sizes
    for icon in manifest["icons"]:
        assert client.get(icon["src"]).status_code == 200


def test_the_service_worker_is_public_and_never_cached_by_http(client):
    response = client.get("/sw.js")
    assert response.status_code == 200
    assert response.mimetype == "text/javascript"
    assert response.headers["Cache-Control"] == "no-cache"
    script = response.get_data(as_text=True)
    assert "/static/js/outbox.js" in script and "/static/css/app.css" in script


def test_the_cache_name_follows_the_asset_hashes(tmp_path):
    (tmp_path / "js").mkdir()
    (tmp_path / "css").mkdir()
    (tmp_path / "js" / "a.js").write_text("one")
    (tmp_path / "css" / "app.css").write_text("body{}")
    first = shell_version(shell_assets(str(tmp_path)))
    assert shell_version(shell_assets(str(tmp_path))) == first
    (tmp_path / "js" / "a.js").write_text("two")
    assert shell_version(shell_assets(str(tmp_path))) != first
    assert set(shell_assets(str(tmp_path))) == {"js/a.js", "css/app.css"}


def test_pages_link_the_manifest_and_load_no_inline_script(client, as_user):
    as_user("chw")
    html = client.get("/").get_data(as_text=True)
    assert 'rel="manifest"' in html
    assert "<script>" not in html and "onclick" not in html


def test_no_template_carries_inline_script_style_or_handler():
    # The CSP (script-src 'self'; style-src 'self') would block them: keep them out at the source.
    import re
    from pathlib import Path

    import clinic_app

    root = Path(clinic_app.__file__).parent / "templates"
    templates = [p for p in root.rglob("*.html")]
    assert len(templates) > 20
    problems = []
    for path in templates:
        html = path.read_text()
        for tag in re.findall(r"<script\b[^>]*>", html):
            if "src=" not in tag and 'type="application/json"' not in tag:
                problems.append(f"{path.name}: inline {tag}")
        for pattern in (r"<style\b", r"\sstyle=", r"javascript:",
                        r"\son(click|load|submit|change|input|error|focus|blur|key\w*|mouse\w*)\s*="):
            problems += [f"{path.name}: {m}" for m in re.findall(pattern, html, re.IGNORECASE)]
    assert problems == []


def test_language_catalogs_are_kept_once_used_not_precached(app):
    # All seven catalogs would be most of the shell (bench/page_weight.py budget, issue 4).
    from clinic_app.web.pwa import shell_assets

    assets = shell_assets(app.static_folder)
    assert not [path for path in assets if path.startswith("i18n/")]
    assert any(path.startswith("icons/sheet/") for path in assets)
