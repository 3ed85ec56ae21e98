"""The public enrolment page: CA download, fingerprint, install steps, QR code; nothing else."""

import datetime as dt

from cryptography import x509

from clinic_app import tls

NOW = dt.datetime.now(dt.UTC)


def _init_ca(app):
    return tls.init_ca_and_server(app.instance_path, ["127.0.0.1"], [], "Lukanda Hills", NOW)


def test_the_page_needs_no_login_and_shows_the_fingerprint(app, client):
    paths = _init_ca(app)
    response = client.get("/enrol")
    assert response.status_code == 200
    page = response.get_data(as_text=True)
    fingerprint = tls.ca_fingerprint_sha256(paths.ca_cert)
    assert fingerprint[:47] in page and fingerprint[48:] in page
    assert "Install a certificate" in page and "CA certificate" in page
    assert "Certificate Trust Settings" in page
    assert 'href="https://127.0.0.1:8443/"' in page


def test_the_page_says_so_when_there_is_no_ca_yet(client):
    page = client.get("/enrol").get_data(as_text=True)
    assert 'id="ca-missing"' in page and 'id="ca-download"' not in page
    assert client.get("/enrol/ca.crt").status_code == 404


def test_the_ca_download_is_the_der_certificate_with_the_ca_type(app, client):
    paths = _init_ca(app)
    response = client.get("/enrol/ca.crt")
    assert response.status_code == 200
    assert response.mimetype == "application/x-x509-ca-cert"
    assert "attachment" in response.headers["Content-Disposition"]
    cert = x509.load_der_x509_certificate(response.data)
    assert cert == x509.load_pem_x509_certificate(paths.ca_cert.read_bytes())
    assert b"PRIVATE" not in response.data


def test_the_qr_code_is_an_svg_of_the_https_address(client):
    response = client.get("/enrol/qr.svg")
    assert response.status_code == 200 and response.mimetype == "image/svg+xml"
    assert response.data.startswith(b"<svg") and b"https://127.0.0.1:8443" in response.data


def test_the_ready_page_loads_its_script_without_inline_code(client):
    page = client.get("/enrol/ready").get_data(as_text=True)
    assert '<script type="module" src="/static/js/pages/ready.js">' in page
    assert "onclick" not in page and "<script>" not in page


def test_the_enrolment_pages_hold_no_login_form(app, client):
    _init_ca(app)
    for path in ("/enrol", "/enrol/ready"):
        page = client.get(path).get_data(as_text=True)
        assert 'type="password"' not in page


def test_plain_http_serves_only_the_enrolment_paths(app, users):
    from werkzeug.test import Client

    from clinic_app import serving

    plain = Client(serving.enrol_only(app))
    assert plain.get("/enrol").status_code == 200
    assert plain.get("/enrol/qr.svg").status_code == 200
    assert plain.get("/static/css/app.css").status_code == 200
    for path in ("/", "/login", "/api/v1/ping", "/api/v1/me", "/admin", "/enrolment-typo/x"):
        response = plain.get(path)
        assert (response.status_code, response.headers["Location"]) == (302, "/enrol"), path
    response = plain.post("/api/v1/login", json={"username": "nurse", "password": "x"})
    assert response.status_code == 302


def test_the_admin_overview_shows_a_qr_code_of_the_plain_http_enrolment_page(app, client,
                                                                              users):
    from tests.conftest import login

    _init_ca(app)
    login(client, "admin")
    page = client.get("/admin").get_data(as_text=True)
    assert 'id="enrol-address">http://127.0.0.1:8000/enrol<' in page
    svg = client.get("/enrol/enrol-qr.svg")
    assert svg.mimetype == "image/svg+xml" and b"http://127.0.0.1:8000/enrol" in svg.data


def test_a_health_worker_finds_the_device_ready_check_on_the_start_page(client, users):
    from tests.conftest import login

    login(client, "chw")
    assert 'href="/enrol/ready"' in client.get("/").get_data(as_text=True)
