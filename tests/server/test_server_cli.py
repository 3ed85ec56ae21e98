"""The tls, backup, restore and serve --tls commands, through Flask's CLI runner."""

import sqlite3
from pathlib import Path

from clinic_app import tls
from clinic_app.storage import audit, db


def _actions(app):
    conn = db.connect(app.config["DATABASE"])
    try:
        return [row["action"] for row in reversed(audit.entries(conn))]
    finally:
        conn.close()


def test_tls_init_creates_the_ca_and_prints_its_fingerprint(app, runner):
    result = runner.invoke(args=["tls", "init", "--ip", "127.0.0.1", "--name", "desk.lan"])
    assert result.exit_code == 0, result.output
    paths = tls.TLSPaths.for_instance(app.instance_path)
    assert tls.ca_fingerprint_sha256(paths.ca_cert) in result.output
    assert "127.0.0.1, desk.lan" in result.output
    assert _actions(app) == ["tls_init"]


def test_tls_init_twice_is_refused_with_a_clear_message(app, runner):
    runner.invoke(args=["tls", "init", "--ip", "127.0.0.1"])
    result = runner.invoke(args=["tls", "init", "--ip", "127.0.0.1"])
    assert result.exit_code == 1
    assert "already exists" in result.output and "tls renew" in result.output
    assert "Traceback" not in result.output


def test_tls_init_refuses_a_bad_address(runner):
    result = runner.invoke(args=["tls", "init", "--ip", "192.168.1"])
    assert result.exit_code == 1 and "Not an IP address" in result.output


def test_tls_renew_keeps_the_ca(app, runner):
    runner.invoke(args=["tls", "init", "--ip", "127.0.0.1"])
    paths = tls.TLSPaths.for_instance(app.instance_path)
    ca, leaf = paths.ca_cert.read_bytes(), paths.server_cert.read_bytes()
    result = runner.invoke(args=["tls", "renew"])
    assert result.exit_code == 0, result.output
    assert paths.ca_cert.read_bytes() == ca and paths.server_cert.read_bytes() != leaf
    assert runner.invoke(args=["tls", "info"]).output.count("127.0.0.1") == 1


def test_tls_info_without_certificates_says_what_to_do(runner):
    result = runner.invoke(args=["tls", "info"])
    assert result.exit_code == 1 and "tls init" in result.output


def test_backup_then_restore_brings_the_data_back(app, runner, users, tmp_path):
    dest = tmp_path / "copy.sqlite3"
    result = runner.invoke(args=["backup", str(dest)])
    assert result.exit_code == 0, result.output
    conn = db.connect(app.config["DATABASE"])
    with db.write(conn):
        conn.execute("DELETE FROM users WHERE username = 'chw2'")
    conn.close()
    result = runner.invoke(args=["restore", str(dest), "--yes"])
    assert result.exit_code == 0, result.output
    conn = db.connect(app.config["DATABASE"])
    names = {row[0] for row in conn.execute("SELECT username FROM users")}
    conn.close()
    assert "chw2" in names
    assert list(Path(app.instance_path, "backups").glob("before-restore-*.sqlite3"))
    assert _actions(app)[-1] == "restore"


def test_restore_refuses_a_bad_file_without_touching_the_database(app, runner, users, tmp_path):
    bad = tmp_path / "bad.sqlite3"
    bad.write_bytes(b"SQLite format 3\x00" + b"\x00" * 5000)
    result = runner.invoke(args=["restore", str(bad), "--yes"])
    assert result.exit_code == 1
    assert "damaged" in result.output and "Traceback" not in result.output
    conn = db.connect(app.config["DATABASE"])
    assert conn.execute("SELECT count(*) FROM users").fetchone()[0] == len(users)
    conn.close()


def test_restore_asks_for_confirmation(runner, tmp_path):
    runner.invoke(args=["backup", str(tmp_path / "copy.sqlite3")])
    result = runner.invoke(args=["restore", str(tmp_path / "copy.sqlite3")], input="n\n")
    assert result.exit_code == 1 and "Aborted" in result.output


def test_a_backup_of_a_real_database_passes_the_schema_check(app, runner, tmp_path):
    runner.invoke(args=["backup", str(tmp_path / "copy.sqlite3")])
    conn = sqlite3.connect(tmp_path / "copy.sqlite3")
    assert conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    conn.close()


def test_serve_tls_refuses_an_address_this_machine_does_not_hold(runner):
    result = runner.invoke(args=["serve", "--tls", "--host", "192.0.2.10"])
    assert result.exit_code == 1
    assert "no network interface with the address 192.0.2.10" in result.output


def test_serve_tls_refuses_to_start_without_a_certificate(runner):
    result = runner.invoke(args=["serve", "--tls", "--host", "127.0.0.1"])
    assert result.exit_code == 1 and "tls init --ip 127.0.0.1" in result.output


def test_plain_serve_takes_the_daily_backup_too(app, runner, tmp_path, monkeypatch):
    """The daily backup (the last 14 kept) runs under `serve` as under `serve --tls`."""
    import time

    from cheroot import wsgi

    from clinic_app.storage.backup import daily_backups

    backups = tmp_path / "daily"
    app.config["BACKUP_DIR"] = str(backups)

    class Server:  # stands for cheroot: "runs" until the first backup is there
        def __init__(self, bind, wsgi_app, numthreads):
            self.stopped = False

        def start(self):
            deadline = time.monotonic() + 20
            while not daily_backups(backups) and time.monotonic() < deadline:
                time.sleep(0.05)
            raise KeyboardInterrupt

        def stop(self):
            self.stopped = True

    monkeypatch.setattr(wsgi, "Server", Server)
    result = runner.invoke(args=["serve", "--host", "127.0.0.1", "--port", "8099"])
    assert result.exit_code == 0, result.output
    [(_taken, path)] = daily_backups(backups)
    check = sqlite3.connect(path)
    assert check.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    check.close()
