"""Stock movements of ORS sachets and zinc tablets (receipts and signed adjustments).

What the cases consumed is not stored here; it comes from the tallies.
"""

from __future__ import annotations

import sqlite3

ITEMS = ("ors_sachets", "zinc_tablets")
KINDS = ("receipt", "adjustment")


def add_movement(
    conn: sqlite3.Connection, *, at: str, item: str, kind: str, quantity: int, user_id: int,
    reason: str = "",
) -> int:
    """Record a receipt (quantity > 0) or an adjustment (signed); return its id.

    Call inside a write transaction (with the audit record).
    """
    if item not in ITEMS or kind not in KINDS:
        raise ValueError(f"unknown stock item or kind: {item!r}, {kind!r}")
    cursor = conn.execute(
        "INSERT INTO stock_movements (at, item, kind, quantity, user_id, reason)"
        " VALUES (?, ?, ?, ?, ?, ?)",
        (at, item, kind, quantity, user_id, reason),
    )
    return cursor.lastrowid


def totals(conn: sqlite3.Connection) -> dict[str, dict[str, int]]:
    """{item: {"received": n, "adjusted": n}} over every movement."""
    out = {item: {"received": 0, "adjusted": 0} for item in ITEMS}
    for row in conn.execute(
        "SELECT item, kind, SUM(quantity) AS n FROM stock_movements GROUP BY item, kind"
    ):
        out[row["item"]]["received" if row["kind"] == "receipt" else "adjusted"] = row["n"]
    return out


def recent(conn: sqlite3.Connection, limit: int = 20) -> list[sqlite3.Row]:
    """The latest movements with the name of who entered them."""
    return conn.execute(
        "SELECT stock_movements.*,"
        " coalesce(nullif(users.display_name, ''), users.username) AS by_name"
        " FROM stock_movements JOIN users ON users.id = stock_movements.user_id"
        " ORDER BY stock_movements.at DESC, stock_movements.id DESC LIMIT ?",
        (limit,),
    ).fetchall()
