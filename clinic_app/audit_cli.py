"""``flask --app clinic_app audit verify``: check the audit log's hash chain.

The log is append-only (SQLite triggers) and each row's hash covers the previous row's hash,
so an edit made behind the triggers' back breaks the chain from that row on.
"""

from __future__ import annotations

import sys

import click
from flask import current_app
from flask.cli import with_appcontext

from clinic_app.storage import audit, db


@click.group("audit")
def audit_group():
    """Checks on the append-only audit log."""


@audit_group.command("verify")
@with_appcontext
def verify_command():
    """Check the audit log's hash chain; name the first broken row and exit 1 when broken."""
    conn = db.connect(current_app.config["DATABASE"])
    try:
        db.migrate(conn)
        total = audit.count(conn)
        broken = audit.verify(conn)
        if broken is None:
            click.echo(f"OK: the audit log's {total} entries form an unbroken chain.")
            return
        row = audit.entry(conn, broken)
    finally:
        conn.close()
    click.echo(f"BROKEN: audit log row {row['id']} ({row['at']} {row['action']} "
               f"{row['record_type']} {row['record_id']}) does not match the chain; it or "
               "an earlier row was changed or removed outside the app.", err=True)
    sys.exit(1)


def register(app) -> None:
    app.cli.add_command(audit_group)
