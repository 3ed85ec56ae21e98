"""Command line: ``flask --app clinic_app <command>``. Every command is listed in docs/cli.md."""

from __future__ import annotations

import sqlite3

import click
from flask import current_app
from flask.cli import with_appcontext

from clinic_app import clock
from clinic_app.passwords import hash_password
from clinic_app.storage import db, users


def open_db() -> sqlite3.Connection:
    conn = db.connect(current_app.config["DATABASE"])
    db.migrate(conn)
    return conn


@click.command("init-db")
@with_appcontext
def init_db_command():
    """Create the database or bring its schema up to date (safe to repeat)."""
    conn = db.connect(current_app.config["DATABASE"])
    applied = db.migrate(conn)
    if applied:
        click.echo(f"Applied {len(applied)} migration(s): {', '.join(applied)}")
    else:
        click.echo(f"Schema already up to date (version {db.schema_version(conn)}).")
    click.echo(f"Database: {current_app.config['DATABASE']}")


def add_user(conn, username: str, role: str, password: str, display_name: str = "",
             area: str = "") -> int:
    """Validate and create a user; raise click.UsageError with a clear message when invalid."""
    if role not in users.ROLES:
        raise click.UsageError(f"Role must be one of {', '.join(users.ROLES)}.")
    if len(password) < int(current_app.config["PASSWORD_MIN_LENGTH"]):
        raise click.UsageError(
            f"The password needs at least {current_app.config['PASSWORD_MIN_LENGTH']} characters.")
    if users.by_username(conn, username) is not None:
        raise click.UsageError(f"The user name {username!r} is already taken.")
    with db.write(conn):
        return users.create(conn, username=username, role=role,
                            password_hash=hash_password(password),
                            created_at=clock.iso(clock.now()), display_name=display_name,
                            area=area)


@click.command("add-user")
@with_appcontext
@click.argument("username")
@click.option("--role", required=True, type=click.Choice(users.ROLES))
@click.option("--password", prompt=True, hide_input=True, confirmation_prompt=True,
              help="Prompted for when left out.")
@click.option("--name", "display_name", default="", help="Name shown on screens.")
@click.option("--area", default="", help="Village or area the user works in.")
def add_user_command(username, role, password, display_name, area):
    """Create a user account."""
    conn = open_db()
    add_user(conn, username, role, password, display_name, area)
    click.echo(f"Created {role} {username!r}.")


@click.command("seed-demo")
@with_appcontext
@click.option("--staff-only", is_flag=True,
              help="Only the staff logins: no demo cases or stock (the browser tests).")
def seed_demo_command(staff_only):
    """Fill the database with the invented demo clinic (only when it has no users yet)."""
    from clinic_app import demo

    conn = open_db()
    logins = demo.seed(conn, with_activity=not staff_only)
    if logins:
        click.echo("Demo clinic created.")
    else:
        click.echo("The database already has users; demo data not added.")
        logins = demo.working_logins(conn)
    if logins:
        click.echo("Demo logins (user name, role, password):")
        for username, role, password in logins:
            click.echo(f"  {username:<12} {role:<11} {password}")


@click.command("export-rules")
@with_appcontext
@click.argument("path", type=click.Path(dir_okay=False, writable=True), default="rulebook.json")
def export_rules_command(path):
    """Write the rulebook JSON (with the clinic settings and its version) for the offline engine."""
    import json

    from clinic_app.clinical.rulebook import rulebook_json
    from clinic_app.storage import settings as settings_store

    conn = open_db()
    data = rulebook_json(settings_store.load(conn))
    with open(path, "w", encoding="utf-8") as fh:
        json.dump(data, fh, ensure_ascii=False, sort_keys=True)
    click.echo(f"Rulebook version {data['version']} written to {path}")


@click.command("serve")
@with_appcontext
@click.option("--host", default=None, help="Address to listen on (config HOST).")
@click.option("--port", default=None, type=int, help="Port (config PORT).")
@click.option("--threads", default=8, show_default=True, help="Worker threads.")
@click.option("--tls", "use_tls", is_flag=True,
              help="HTTPS on TLS_PORT with the clinic's certificate (docs/tls.md).")
def serve_command(host, port, threads, use_tls):
    """Serve the app with cheroot, a threaded production WSGI server (Linux and Windows)."""
    if use_tls or current_app.config["TLS"]:
        from clinic_app.server_cli import serve_tls

        return serve_tls(host, port, threads)
    from cheroot import wsgi

    host = host or current_app.config["HOST"]
    port = port or int(current_app.config["PORT"])
    conn = open_db()
    conn.close()
    from clinic_app import serving

    app = current_app._get_current_object()
    server = wsgi.Server((host, port), app, numthreads=threads)
    stop_backups = serving.start_daily_backups(app, click.echo)
    click.echo(f"Rehydration Desk serving on http://{host}:{port}  (Ctrl+C to stop)")
    try:
        server.start()
    except KeyboardInterrupt:
        server.stop()
    finally:
        stop_backups.set()


def init_app(app) -> None:
    for command in (init_db_command, add_user_command, seed_demo_command, export_rules_command,
                    serve_command):
        app.cli.add_command(command)
    from clinic_app import audit_cli, server_cli

    server_cli.register(app)  # tls, backup, restore (issue 8)
    audit_cli.register(app)  # audit verify (issue 9)
