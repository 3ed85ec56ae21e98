"""Commands that keep a clinic's server alive: certificates, backups, restore, HTTPS serving.

``flask --app clinic_app tls init|renew|info``, ``backup PATH``, ``restore PATH`` and the
``serve --tls`` mode (called from cli.py's ``serve``). Every command is listed in docs/cli.md.
"""

from __future__ import annotations

import threading
from pathlib import Path

import click
from flask import current_app
from flask.cli import with_appcontext

from clinic_app import clock, serving, tls
from clinic_app.storage import audit, db, profile
from clinic_app.storage.backup import BackupError, backup, check_backup, restore

CERT_WARNING_DAYS = 60


def instance_dir() -> Path:
    """Where the certificates live (config CERT_DIR, else the instance folder)."""
    return serving.cert_dir(current_app)


def backup_dir() -> Path:
    """Where the automatic daily backups and the pre-restore safety copies go."""
    return serving.backup_dir(current_app)


def _audit(action: str, record_type: str, record_id: str) -> None:
    conn = db.connect(current_app.config["DATABASE"])
    try:
        db.migrate(conn)
        with db.write(conn):
            audit.record(
                conn,
                at=clock.iso(clock.now()),
                user_id=None,
                action=action,
                record_type=record_type,
                record_id=record_id,
            )
    finally:
        conn.close()


def _clinic_name() -> str:
    conn = db.connect(current_app.config["DATABASE"])
    try:
        db.migrate(conn)
        return profile.load(conn).clinic_name or "Clinic"
    finally:
        conn.close()


def _describe(paths: tls.TLSPaths) -> None:
    ips, names = tls.server_addresses(paths.server_cert)
    now = clock.now()
    click.echo(f"CA certificate:       {paths.ca_cert}")
    click.echo(f"CA key (keep apart):  {paths.ca_key}")
    click.echo(f"Server certificate:   {paths.server_cert}")
    click.echo("Covers:               " + ", ".join([str(ip) for ip in ips] + names))
    click.echo(
        f"Expires:              {clock.iso(tls.not_after(paths.server_cert))} "
        f"({tls.days_until_expiry(paths.server_cert, now)} days)"
    )
    click.echo(f"CA SHA-256:           {tls.ca_fingerprint_sha256(paths.ca_cert)}")


@click.group("tls")
def tls_group():
    """The clinic's certificate authority and HTTPS server certificate."""


@tls_group.command("init")
@with_appcontext
@click.option(
    "--ip",
    "ips",
    multiple=True,
    required=True,
    help="The laptop's fixed IP address (repeat for several).",
)
@click.option("--name", "names", multiple=True, help="A DNS name for the laptop (optional).")
@click.option("--clinic", default=None, help="Clinic name shown in the CA certificate.")
@click.option(
    "--force",
    is_flag=True,
    help="Replace an existing CA (every phone must then be enrolled again).",
)
def tls_init_command(ips, names, clinic, force):
    """Create the clinic's CA and a server certificate for the given addresses."""
    try:
        paths = tls.init_ca_and_server(
            instance_dir(), ips, names, clinic or _clinic_name(), clock.now(), force=force
        )
    except tls.TLSError as exc:
        raise click.ClickException(str(exc)) from None
    _audit("tls_init", "certificate", tls.ca_fingerprint_sha256(paths.ca_cert))
    click.echo("Created the clinic's certificate authority and server certificate.")
    _describe(paths)
    click.echo("Next: 'serve --tls', then enrol each phone from http://<address>:<PORT>/enrol.")


@tls_group.command("renew")
@with_appcontext
@click.option("--ip", "ips", multiple=True, help="New address list (default: keep the current).")
@click.option("--name", "names", multiple=True, help="New name list (default: keep the current).")
def tls_renew_command(ips, names):
    """Re-issue the server certificate from the same CA (phones need nothing new)."""
    try:
        paths = tls.renew_server(instance_dir(), clock.now(), ips=ips or None, names=names or None)
    except tls.TLSError as exc:
        raise click.ClickException(str(exc)) from None
    _audit("tls_renew", "certificate", tls.ca_fingerprint_sha256(paths.ca_cert))
    click.echo("Renewed the server certificate; restart 'serve --tls' to use it.")
    _describe(paths)


@tls_group.command("info")
@with_appcontext
def tls_info_command():
    """Show the certificate files, the addresses covered, the expiry and the CA fingerprint."""
    paths = tls.TLSPaths.for_instance(instance_dir())
    if not paths.server_cert.exists() or not paths.ca_cert.exists():
        raise click.ClickException("No certificates yet: run 'tls init --ip <laptop address>'.")
    _describe(paths)


@click.command("backup")
@with_appcontext
@click.argument("path", type=click.Path(dir_okay=False, writable=True))
def backup_command(path):
    """Copy the database to PATH, consistently, even while the server is running."""
    try:
        dest = backup(current_app.config["DATABASE"], path)
    except BackupError as exc:
        raise click.ClickException(str(exc)) from None
    _audit("backup", "database", dest.name)
    click.echo(f"Backup written to {dest} ({dest.stat().st_size} bytes).")


@click.command("restore")
@with_appcontext
@click.argument("path", type=click.Path(dir_okay=False))
@click.option("--yes", is_flag=True, help="Do not ask for confirmation.")
def restore_command(path, yes):
    """Replace the database with the backup at PATH, after checking it (stop the server first)."""
    latest = max((number for number, _name, _sql in db.migrations()), default=0)
    try:
        version = check_backup(path, max_version=latest)
    except BackupError as exc:
        raise click.ClickException(str(exc)) from None
    database = current_app.config["DATABASE"]
    if not yes:
        click.confirm(
            f"Replace {database} with {path}? Stop the server first. The current "
            f"database is kept in {backup_dir()}.",
            abort=True,
        )
    stamp = clock.now().strftime("%Y%m%dT%H%M%SZ")
    safety = backup_dir() / f"before-restore-{stamp}.sqlite3"
    try:
        restore(path, database, safety_copy=safety, max_version=latest)
    except BackupError as exc:
        raise click.ClickException(str(exc)) from None
    _audit("restore", "database", Path(path).name)  # also migrates an older backup forward
    click.echo(
        f"Restored {path} (schema {version}). The previous database is in {safety}"
        if Path(safety).exists()
        else f"Restored {path} (schema {version})."
    )


def serve_tls(host: str | None, port: int | None, threads: int) -> None:
    """HTTPS on HOST:TLS_PORT for the app, plain HTTP on HOST:PORT for the enrolment page only,
    and a daily backup; refuses to start on an address this machine does not hold."""
    app = current_app._get_current_object()
    cfg = app.config
    try:
        host = serving.require_local_address(host or cfg["HOST"])
        paths = serving.require_certificate_for(host, instance_dir(), clock.now())
    except serving.ServeError as exc:
        raise click.ClickException(str(exc)) from None
    https_port = port or int(cfg["TLS_PORT"])
    http_port = int(cfg["PORT"])
    cfg["SESSION_COOKIE_SECURE"] = True
    conn = db.connect(cfg["DATABASE"])
    db.migrate(conn)
    conn.close()
    origin = serving.origin(host, https_port)
    servers = [
        serving.make_server(app, host, https_port, threads=threads, paths=paths),
        serving.make_server(serving.enrol_only(app), host, http_port, threads=2),
    ]
    try:
        for server in servers:
            server.prepare()
    except OSError as exc:
        raise click.ClickException(f"Cannot listen on {host}: {exc}") from None
    workers = [threading.Thread(target=s.serve, daemon=True) for s in servers]
    for worker in workers:
        worker.start()
    stop = serving.start_daily_backups(app, click.echo)
    days = tls.days_until_expiry(paths.server_cert, clock.now())
    if days <= CERT_WARNING_DAYS:
        click.echo(f"Warning: the server certificate expires in {days} days; run 'tls renew'.")
    click.echo(
        f"Rehydration Desk serving on {origin}/  (enrolment: "
        f"{serving.origin(host, http_port, 'http')}/enrol)  Ctrl+C to stop"
    )
    try:
        while any(w.is_alive() for w in workers):
            workers[0].join(0.5)
    except KeyboardInterrupt:
        pass
    finally:
        stop.set()
        for server in servers:
            server.stop()


def register(app) -> None:
    for command in (tls_group, backup_command, restore_command):
        app.cli.add_command(command)
