"""The docs stay true: every config key and every CLI command is documented."""

from __future__ import annotations

import re
from pathlib import Path

from clinic_app.config import DEFAULTS

DOCS = Path(__file__).resolve().parents[1] / "docs"


def test_every_config_key_is_documented_and_no_stale_key_is():
    documented = set(re.findall(r"^\| `([A-Z_0-9]+)` \|", (DOCS / "config.md").read_text(), re.M))
    assert documented == set(DEFAULTS)


def test_every_cli_command_is_documented(app):
    text = (DOCS / "cli.md").read_text()
    commands = set()

    def walk(group, prefix=""):
        for name, command in group.commands.items():
            full = f"{prefix}{name}"
            if hasattr(command, "commands"):
                walk(command, full + " ")
            else:
                commands.add(full)

    walk(app.cli)
    missing = [c for c in sorted(commands) if f"`{c}" not in text]
    assert missing == []
