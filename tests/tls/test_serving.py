"""Start-up checks of the server and cheroot's TLS adapter serving a WSGI app."""

import datetime as dt
import http.client
import socket
import ssl
import threading

import pytest

from clinic_app import serving, tls

REAL_NOW = dt.datetime.now(dt.UTC).replace(microsecond=0)


def test_a_loopback_address_is_local():
    assert serving.address_is_local("127.0.0.1")


def test_a_documentation_address_is_not_local():
    # 192.0.2.0/24 is TEST-NET-1 (RFC 5737), never assigned to a real interface.
    assert not serving.address_is_local("192.0.2.10")


def test_an_ipv6_documentation_address_is_not_local():
    assert not serving.address_is_local("2001:db8::10")  # RFC 3849 documentation prefix


def test_it_refuses_an_address_the_machine_does_not_hold_and_says_why():
    with pytest.raises(serving.ServeError, match="no network interface with the address 192"):
        serving.require_local_address("192.0.2.10")


@pytest.mark.parametrize("host", ["0.0.0.0", "::", "clinic.lan", ""])
def test_it_refuses_a_host_that_is_not_one_fixed_address(host):
    with pytest.raises(serving.ServeError, match="fixed IP address"):
        serving.require_local_address(host)


def test_it_accepts_a_local_address():
    assert serving.require_local_address("127.0.0.1") == "127.0.0.1"


def test_it_refuses_to_serve_https_without_a_certificate(tmp_path):
    with pytest.raises(serving.ServeError, match="tls init --ip 127.0.0.1"):
        serving.require_certificate_for("127.0.0.1", tmp_path, REAL_NOW)


def test_it_refuses_a_certificate_for_another_address(tmp_path):
    tls.init_ca_and_server(tmp_path, ["127.0.0.1"], [], "Mbeya", REAL_NOW)
    with pytest.raises(serving.ServeError, match="for 127.0.0.1, not 127.0.0.2"):
        serving.require_certificate_for("127.0.0.2", tmp_path, REAL_NOW)


def test_it_refuses_an_expired_certificate(tmp_path):
    tls.init_ca_and_server(tmp_path, ["127.0.0.1"], [], "Mbeya", REAL_NOW)
    with pytest.raises(serving.ServeError, match="tls renew"):
        serving.require_certificate_for("127.0.0.1", tmp_path, REAL_NOW + dt.timedelta(days=900))


def _app(environ, start_response):
    start_response("200 OK", [("Content-Type", "text/plain")])
    return [environ["wsgi.url_scheme"].encode()]


def test_cheroot_serves_https_that_verifies_against_the_clinic_ca(tmp_path):
    paths = tls.init_ca_and_server(tmp_path, ["127.0.0.1"], [], "Mbeya", REAL_NOW)
    server = serving.make_server(_app, "127.0.0.1", 0, threads=2, paths=paths)
    server.prepare()
    thread = threading.Thread(target=server.serve, daemon=True)
    thread.start()
    try:
        port = server.bind_addr[1]
        context = ssl.create_default_context(cafile=str(paths.ca_cert))
        conn = http.client.HTTPSConnection("127.0.0.1", port, context=context, timeout=10)
        conn.request("GET", "/")
        response = conn.getresponse()
        assert (response.status, response.read()) == (200, b"https")
        conn.close()
        with pytest.raises(ssl.SSLCertVerificationError):
            with socket.create_connection(("127.0.0.1", port), timeout=10) as raw:
                ssl.create_default_context().wrap_socket(raw, server_hostname="127.0.0.1")
    finally:
        server.stop()
        thread.join(10)


def test_the_daily_backup_loop_backs_up_once_and_stops_when_asked(tmp_path):
    import sqlite3

    db = tmp_path / "clinic.sqlite3"
    conn = sqlite3.connect(db)
    conn.executescript("CREATE TABLE users (id INTEGER PRIMARY KEY); PRAGMA user_version = 1;")
    conn.close()
    stop = threading.Event()
    stop.set()  # one pass, then return
    said = []
    serving.daily_backup_loop(db, tmp_path / "backups", lambda: REAL_NOW, stop, said.append)
    assert [p.name for p in (tmp_path / "backups").iterdir()] == [
        f"daily-{REAL_NOW:%Y%m%dT%H%M%S}Z.sqlite3"]
    assert said and said[0].startswith("Daily backup written to")


def test_a_failing_daily_backup_is_reported_and_does_not_raise(tmp_path):
    stop = threading.Event()
    stop.set()
    said = []
    serving.daily_backup_loop(tmp_path / "missing.sqlite3", tmp_path / "b", lambda: REAL_NOW,
                              stop, said.append)
    assert said == [f"Daily backup failed: There is no database at {tmp_path / 'missing.sqlite3'}."]
