"""Print rulebook JSON for the JavaScript engine tests (tests/js/engine.test.mjs).

Reads a JSON list of ClinicSettings overrides on stdin (e.g. ``[{}, {"plan_b_table": "imci"}]``)
and prints the list of ``rulebook_json(ClinicSettings(**overrides))``, one per entry, so the
node tests always run against the rulebook the Python core uses right now.
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from clinic_app.clinical.rulebook import rulebook_json  # noqa: E402
from clinic_app.clinical.types import ClinicSettings  # noqa: E402


def main() -> None:
    overrides = json.load(sys.stdin)
    json.dump([rulebook_json(ClinicSettings(**o)) for o in overrides], sys.stdout)


if __name__ == "__main__":
    main()
