"""Backups of the clinic database: online copies, checked restores, and a daily rotation.

Copies go through SQLite's online backup API, never a file copy: with WAL the newest commits may
live only in the ``-wal`` file, and copying the main file alone would lose them (or copy a page
that is half written). The API copies one consistent snapshot while the server keeps writing.
"""

from __future__ import annotations

import datetime as dt
import os
import re
import sqlite3
from collections.abc import Iterable
from pathlib import Path

SQLITE_HEADER = b"SQLite format 3\x00"
# Tables the first migration creates: a file without them is not a clinic database.
REQUIRED_TABLES = ("users", "audit_log", "settings_versions")
KEEP_DAILY = 14
_DAILY_NAME = re.compile(r"^daily-(\d{8}T\d{6}Z)\.sqlite3$")
_STAMP = "%Y%m%dT%H%M%SZ"


class BackupError(Exception):
    """A backup or restore was refused; the message is meant for the operator."""


def _open_source(source: sqlite3.Connection | str | os.PathLike[str]):
    if isinstance(source, sqlite3.Connection):
        return source, False
    path = Path(source)
    if not path.is_file():
        raise BackupError(f"There is no database at {path}.")
    return sqlite3.connect(path, timeout=10), True


def backup(
    source: sqlite3.Connection | str | os.PathLike[str], dest: str | os.PathLike[str]
) -> Path:
    """Copy the live database ``source`` (a connection or a path) to the file ``dest``.

    The copy is written next to ``dest`` and renamed into place only once it is complete and
    passes ``PRAGMA quick_check``, so a crash never leaves a half-written file under the final
    name. The copy is switched to rollback-journal mode so it is one self-contained file.
    """
    dest = Path(dest)
    dest.parent.mkdir(parents=True, exist_ok=True)
    partial = dest.with_name(dest.name + ".partial")
    partial.unlink(missing_ok=True)
    src, owned = _open_source(source)
    try:
        target = sqlite3.connect(partial)
        try:
            # pages=-1 copies everything in one step under one read transaction: a consistent
            # snapshot. WAL lets the server's writers carry on meanwhile.
            src.backup(target, pages=-1)
            target.execute("PRAGMA journal_mode = DELETE")
            check = target.execute("PRAGMA quick_check").fetchone()[0]
        finally:
            target.close()
    except sqlite3.Error as exc:
        partial.unlink(missing_ok=True)
        raise BackupError(f"The backup could not be written to {dest}: {exc}") from exc
    finally:
        if owned:
            src.close()
    if check != "ok":
        partial.unlink(missing_ok=True)
        raise BackupError(f"The backup copy failed its check ({check}); nothing was written.")
    os.replace(partial, dest)
    return dest


def check_backup(
    src: str | os.PathLike[str],
    *,
    required_tables: Iterable[str] = REQUIRED_TABLES,
    max_version: int | None = None,
) -> int:
    """Check that ``src`` is a sound clinic database; return its schema version.

    Refuses (BackupError) a missing, empty or non-SQLite file, a file that fails
    ``PRAGMA integrity_check``, a database without the clinic's tables, and one made by a newer
    version of the app than ``max_version``.
    """
    path = Path(src)
    if not path.is_file():
        raise BackupError(f"{path} is not a file.")
    with path.open("rb") as handle:
        header = handle.read(len(SQLITE_HEADER))
    if not header:
        raise BackupError(f"{path} is empty; it is not a backup.")
    if header != SQLITE_HEADER:
        raise BackupError(f"{path} is not an SQLite database; it is not a backup.")
    conn = sqlite3.connect(f"{path.resolve().as_uri()}?mode=ro", uri=True)
    try:
        problems = [row[0] for row in conn.execute("PRAGMA integrity_check(20)")]
        if problems != ["ok"]:
            raise BackupError(
                f"{path} is damaged and was not restored. The integrity check said: "
                + "; ".join(problems[:3])
            )
        tables = {row[0] for row in conn.execute("SELECT name FROM sqlite_master")}
        version = conn.execute("PRAGMA user_version").fetchone()[0]
    except sqlite3.DatabaseError as exc:
        raise BackupError(f"{path} is damaged and was not restored ({exc}).") from exc
    finally:
        conn.close()
    missing = sorted(set(required_tables) - tables)
    if missing or version < 1:
        raise BackupError(
            f"{path} is a database, but not one of this clinic app (missing: "
            + (", ".join(missing) or "schema version")
            + ")."
        )
    if max_version is not None and version > max_version:
        raise BackupError(
            f"{path} was made by a newer version of the app (schema {version}, this app knows "
            f"up to {max_version}). Update the app before restoring it."
        )
    return version


def restore(
    src: str | os.PathLike[str],
    db_path: str | os.PathLike[str],
    *,
    safety_copy: str | os.PathLike[str] | None = None,
    required_tables: Iterable[str] = REQUIRED_TABLES,
    max_version: int | None = None,
) -> int:
    """Replace the database at ``db_path`` with the backup ``src``; return its schema version.

    ``src`` is checked first (see ``check_backup``) and a bad file changes nothing. When
    ``safety_copy`` is given and a database exists, it is backed up there before being replaced.
    The copy goes through the backup API into the target, so SQLite keeps the target's WAL and
    shared-memory files consistent (replacing the file on disk would not).
    """
    version = check_backup(src, required_tables=required_tables, max_version=max_version)
    db_path = Path(db_path)
    if safety_copy is not None and db_path.exists():
        backup(db_path, safety_copy)
    db_path.parent.mkdir(parents=True, exist_ok=True)
    source = sqlite3.connect(f"{Path(src).resolve().as_uri()}?mode=ro", uri=True)
    target = sqlite3.connect(db_path, timeout=10)
    try:
        source.backup(target, pages=-1)
        check = target.execute("PRAGMA quick_check").fetchone()[0]
    except sqlite3.Error as exc:
        raise BackupError(f"The restore into {db_path} failed: {exc}") from exc
    finally:
        source.close()
        target.close()
    if check != "ok":
        raise BackupError(f"The restored database failed its check ({check}).")
    return version


def daily_backups(backup_dir: str | os.PathLike[str]) -> list[tuple[dt.datetime, Path]]:
    """The automatic backups in ``backup_dir`` as (time taken, path), oldest first."""
    found = []
    directory = Path(backup_dir)
    if not directory.is_dir():
        return []
    for entry in directory.iterdir():
        match = _DAILY_NAME.match(entry.name)
        if match:
            taken = dt.datetime.strptime(match.group(1), _STAMP).replace(tzinfo=dt.UTC)
            found.append((taken, entry))
    return sorted(found)


def last_backup_time(backup_dir: str | os.PathLike[str]) -> dt.datetime | None:
    """When the newest automatic backup was taken (UTC), or None if there is none."""
    backups = daily_backups(backup_dir)
    return backups[-1][0] if backups else None


def maybe_daily_backup(
    db_path: str | os.PathLike[str],
    backup_dir: str | os.PathLike[str],
    now: dt.datetime,
    *,
    keep: int = KEEP_DAILY,
) -> Path | None:
    """Take today's automatic backup unless one exists for ``now``'s UTC date; keep the newest
    ``keep``. Returns the new file, or None when today's backup was already there.

    The time comes from the file name, not the file's modification time, which copying to and
    from a USB drive can change.
    """
    if now.tzinfo is None:
        raise ValueError("now must be timezone-aware")
    now = now.astimezone(dt.UTC)
    existing = daily_backups(backup_dir)
    if existing and existing[-1][0].date() >= now.date():
        return None
    dest = Path(backup_dir) / f"daily-{now.strftime(_STAMP)}.sqlite3"
    backup(db_path, dest)
    for _taken, old in daily_backups(backup_dir)[:-keep]:
        old.unlink(missing_ok=True)
    return dest


def last_recorded_backup(conn: sqlite3.Connection) -> str | None:
    """When the newest backup recorded in the audit log (``backup`` command) was taken."""
    row = conn.execute("SELECT max(at) FROM audit_log WHERE action = 'backup'").fetchone()
    return row[0] if row else None
