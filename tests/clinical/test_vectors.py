"""assess() reproduces every golden vector exactly (the same file pins the JS engine)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from clinic_app.clinical import AssessmentInputError, ClinicSettings, assess

VECTORS_FILE = Path(__file__).resolve().parents[1] / "vectors" / "assessments.json"
VECTORS = json.loads(VECTORS_FILE.read_text())


def test_there_are_enough_vectors_spanning_every_plan_and_error():
    assert len(VECTORS) >= 150
    outcomes = {v["expected"].get("plan") or v["expected"]["error"]["code"] for v in VECTORS}
    assert outcomes == {"A", "B", "C", "SAM", "invalid_input", "implausible_weight"}
    assert len({v["name"] for v in VECTORS}) == len(VECTORS)


@pytest.mark.parametrize("vector", VECTORS, ids=[v["name"] for v in VECTORS])
def test_assess_reproduces_the_vector(vector):
    settings = ClinicSettings(**vector.get("settings", {}))
    try:
        result = assess(vector["input"], settings)
    except AssessmentInputError as err:
        result = err.as_json()
    else:
        # The version hashes the whole rulebook; it is pinned by test_rulebook instead.
        assert result.pop("rulebook_version")
    assert json.loads(json.dumps(result)) == vector["expected"]
