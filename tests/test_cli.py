"""The command line: init-db, add-user, seed-demo, serve."""

from __future__ import annotations

import os
import subprocess
import sys
import urllib.request

from clinic_app.storage import db
from tests.e2e.conftest import ROOT, LiveServer


def flask(args, env, input_text=None):
    return subprocess.run([sys.executable, "-m", "flask", "--app", "clinic_app", *args],
                          cwd=ROOT, env=env, input=input_text, capture_output=True, text=True,
                          timeout=120)


def make_env(tmp_path):
    return {**os.environ, "CLINIC_APP_DATABASE": str(tmp_path / "cli.sqlite3"),
            "CLINIC_APP_SECRET_KEY": "cli-test", "CLINIC_APP_ARGON2_MEMORY_COST": "8",
            "CLINIC_APP_ARGON2_TIME_COST": "1", "CLINIC_APP_ARGON2_PARALLELISM": "1"}


def dump(path):
    conn = db.connect(str(path))
    try:
        return list(conn.iterdump()), db.schema_version(conn)
    finally:
        conn.close()


def test_init_db_is_idempotent_and_a_second_run_changes_nothing(tmp_path):
    env = make_env(tmp_path)
    first = flask(["init-db"], env)
    assert first.returncode == 0, first.stderr
    assert "Applied" in first.stdout
    before = dump(tmp_path / "cli.sqlite3")
    second = flask(["init-db"], env)
    assert second.returncode == 0 and "already up to date" in second.stdout
    assert dump(tmp_path / "cli.sqlite3") == before
    assert before[1] == db.migrations()[-1][0]


def test_add_user_creates_an_account_that_can_log_in(tmp_path, app):
    env = make_env(tmp_path)
    flask(["init-db"], env)
    result = flask(["add-user", "halima", "--role", "nurse", "--password", "long-enough-1"], env)
    assert result.returncode == 0, result.stderr
    app.config["DATABASE"] = env["CLINIC_APP_DATABASE"]
    response = app.test_client().post("/api/v1/login",
                                      json={"username": "halima", "password": "long-enough-1"})
    assert response.status_code == 200
    assert response.get_json()["user"]["role"] == "nurse"


def test_add_user_prompts_for_the_password_when_it_is_left_out(tmp_path):
    env = make_env(tmp_path)
    result = flask(["add-user", "kito", "--role", "chw"], env, "prompted-pass\nprompted-pass\n")
    assert result.returncode == 0, result.stderr
    assert "Created chw 'kito'" in result.stdout


def test_add_user_refuses_short_passwords_and_unknown_roles_clearly(tmp_path):
    env = make_env(tmp_path)
    short = flask(["add-user", "kito", "--role", "chw", "--password", "short"], env)
    assert short.returncode != 0 and "at least 8 characters" in short.stderr
    assert "Traceback" not in short.stderr
    role = flask(["add-user", "kito", "--role", "doctor", "--password", "long-enough-1"], env)
    assert role.returncode != 0 and "doctor" in role.stderr


def test_seed_demo_prints_logins_once(tmp_path):
    env = make_env(tmp_path)
    first = flask(["seed-demo"], env)
    assert first.returncode == 0 and "amina" in first.stdout and "demo-chw-amina" in first.stdout
    second = flask(["seed-demo"], env)
    assert "already has users" in second.stdout
    assert "demo-chw-amina" in second.stdout  # make run prints the logins every time


def test_serve_serves_the_login_page(tmp_path):
    server = LiveServer(tmp_path)
    server.start()
    try:
        with urllib.request.urlopen(server.url + "/login", timeout=5) as response:
            assert response.status == 200
            assert b"Log in" in response.read()
    finally:
        server.stop()


def test_an_unknown_clinic_app_variable_stops_the_start(tmp_path):
    env = {**make_env(tmp_path), "CLINIC_APP_DATABSE": "typo.sqlite3"}
    result = flask(["init-db"], env)
    assert result.returncode != 0
    assert "Unknown setting CLINIC_APP_DATABSE" in result.stderr
