"""De-identified case rows for the supervisor's CSV export.

The column list is fixed here and holds neither ``household_ref`` nor ``note``: the export
must never carry what could identify a household.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Iterator

CASE_COLUMNS = (
    "id", "created_at", "area", "user_id", "age_months", "sex", "severity", "plan", "refer",
    "classifications", "danger_sign", "suspected_cholera", "ors_sachets", "zinc_tablets",
    "referral_made", "outcome", "engine_mismatch", "rulebook_version",
)  # fmt: skip


def case_rows(conn: sqlite3.Connection, since_day: str, until_day: str) -> Iterator[tuple]:
    """Active cases whose local date is in [since_day, until_day), oldest first."""
    yield from conn.execute(
        f"SELECT {', '.join(CASE_COLUMNS)} FROM cases"
        " WHERE status = 'active' AND created_at >= ? AND created_at < ? ORDER BY created_at",
        (since_day, until_day),
    )
