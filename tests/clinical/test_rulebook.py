"""The rulebook: every number of the core lives there, beside a registered source."""

from __future__ import annotations

import ast
import json
import math
from pathlib import Path

import pytest

import clinic_app.clinical
from clinic_app.clinical import ClinicSettings, rulebook_json
from clinic_app.clinical.rulebook import RULES, SOURCES, rulebook_version

CORE = Path(clinic_app.clinical.__file__).parent
CORE_MODULES = ["assess.py", "classify.py", "plans.py", "validate.py", "messages.py", "types.py"]
ALLOWED_NUMBERS = {0, 1}


def numeric_literals(source: str) -> list[tuple[int, object]]:
    found = []
    for node in ast.walk(ast.parse(source)):
        if (isinstance(node, ast.Constant) and isinstance(node.value, int | float)
                and not isinstance(node.value, bool) and node.value not in ALLOWED_NUMBERS):
            found.append((node.lineno, node.value))
    return found


# The half-up rounding offset is part of the rounding operation fixed in CORE_INTERFACE.md
# (floor(x / p + 0.5) * p), not a clinical number.
OPERATION_CONSTANTS = {"messages.py": [0.5]}


@pytest.mark.parametrize("module", CORE_MODULES)
def test_core_modules_hold_no_numbers_of_their_own(module):
    found = [value for _line, value in numeric_literals((CORE / module).read_text())]
    assert found == OPERATION_CONSTANTS.get(module, [])


def test_the_number_check_would_catch_a_threshold_in_code():
    assert numeric_literals("if muac < 115:\n    x = 0.5 * w + 1\n") == [(1, 115), (2, 0.5)]


def _walk(value, path):
    yield path, value
    if isinstance(value, dict):
        for key, child in value.items():
            yield from _walk(child, f"{path}.{key}")
    elif isinstance(value, list):
        for i, child in enumerate(value):
            yield from _walk(child, f"{path}[{i}]")


@pytest.mark.parametrize("key", sorted(RULES))
def test_every_rule_names_a_registered_source(key):
    entry = RULES[key]
    assert entry.get("source") in SOURCES, key
    for path, value in _walk(entry, key):
        if isinstance(value, dict):
            if "source" in value:
                assert value["source"] in SOURCES, path
            if "status" in value:
                assert value["status"] == "unconfirmed", path


@pytest.mark.parametrize("kind", ["actions", "cautions"])
def test_every_text_has_a_source_and_a_place_in_the_order(kind):
    texts, order = RULES[kind]["texts"], RULES[kind]["order"]
    assert sorted(texts) == sorted(order) and len(order) == len(set(order))
    for code, entry in texts.items():
        assert entry["source"] in SOURCES, code
        if entry.get("status") == "unconfirmed":
            assert entry["label"], code


def test_the_rulebook_json_is_plain_json_and_versioned():
    body = rulebook_json(ClinicSettings())
    assert set(body) == {"version", "sources", "rules", "settings", "growth_tables"}
    assert json.loads(json.dumps(body)) == body
    assert len(body["version"]) == 64


def test_the_version_changes_with_the_clinic_settings_and_is_stable():
    a = rulebook_version(ClinicSettings())
    assert a == rulebook_version(ClinicSettings())
    assert a != rulebook_version(ClinicSettings(plan_b_table="imci"))
    assert a != rulebook_version(ClinicSettings(referral_facility_name="Mapalo Health Centre"))


def test_the_settings_defaults_come_from_the_rulebook():
    s = ClinicSettings()
    assert (s.zinc_days_min, s.zinc_days_max) == (10, 14)  # S15: 10-14 days
    assert s.maintenance_above_20kg_ml_per_kg == 20  # S26: Holliday-Segar original
    assert s.cup_ml == 200  # S02: 50-100 ml is a quarter to half a large cup


def test_N13_ors_composition_adds_up():
    # S16 / N13: 2.6 + 13.5 + 1.5 + 2.9 = 20.5 g/L; 75 + 65 + 75 + 20 + 10 = 245 mOsm/L.
    ors = RULES["ors_composition"]
    assert math.isclose(sum(ors["g_per_l"].values()), ors["total_g_per_l"]) and ors["total_g_per_l"] == 20.5
    assert sum(ors["mmol_per_l"].values()) == ors["osmolarity_mosm_per_l"] == 245


def test_volume_rounding_is_no_coarser_than_10_ml():
    # Issue 3 contract; PRACTICE: 5 ml.
    assert 0 < RULES["volume_rounding_ml"]["value"] <= 10
