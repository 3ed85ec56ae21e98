"""The one place the web layer reads the time. Tests inject a clock through config["CLOCK"]."""

from __future__ import annotations

from datetime import UTC, datetime

from flask import current_app


def system_now() -> datetime:
    return datetime.now(UTC)


def now() -> datetime:
    """Current UTC time, from the app's injected clock when one is configured."""
    clock = current_app.config.get("CLOCK") if current_app else None
    return (clock or system_now)()


def iso(moment: datetime) -> str:
    return moment.astimezone(UTC).isoformat(timespec="seconds").replace("+00:00", "Z")
