"""Parity: the offline JavaScript engine (static/js/engine.js) gives the Python core's answer.

Over 10,000 generated inputs go through ``assess()`` here and through ONE node process running
the engine over a JSON file (tests/js/parity_runner.mjs). Every result must have the same
canonical JSON text as the server's, because the sync API flags ``engine_mismatch`` by comparing
exactly that text. The inputs cross every discrete sign combination and every danger-sign
on/off pattern with sampled ages (each rulebook age edge, and just either side of it),
weights (none, entered estimates, table edges, implausible ones), MUAC, oedema, height and sex,
days of diarrhoea, blood, score items, sodium, context overrides and clinic settings with both
Plan B tables; a share of deliberately bad inputs checks the 422 field errors too.
"""

from __future__ import annotations

import itertools
import json
import random
import shutil
import subprocess
from pathlib import Path

import pytest

from clinic_app.clinical import ClinicSettings, assess
from clinic_app.clinical.growth import age_days, tables_json
from clinic_app.clinical.rulebook import RULES, rulebook_json
from clinic_app.clinical.types import AssessmentInputError

ROOT = Path(__file__).resolve().parents[2]
RUNNER = ROOT / "tests" / "js" / "parity_runner.mjs"
SAMPLES_PER_COMBINATION = 9
# Most danger-sign patterns have a danger sign, which masks the routine branches (Plan B
# reassessment, routine referral): the sign combinations without one get extra samples.
SAMPLES_WITHOUT_DANGER = 30
EPSILONS = (1e-9, 0.01)

SETTINGS = [
    ClinicSettings(),
    ClinicSettings(plan_b_table="imci"),
    ClinicSettings(iv_available=True, referral_facility_name="Mbeya Hill health centre",
                   referral_facility_phone="+000 555 0101"),
    ClinicSettings(plan_b_table="imci", ng_trained=True, minutes_to_iv_facility=45,
                   zinc_days_min=10, zinc_days_max=10, maintenance_above_20kg_ml_per_kg=25,
                   zinc_max_age_months=180),
    ClinicSettings(minutes_to_iv_facility=20, cholera_in_area=True, cup_ml=250,
                   referral_facility_phone="+000 555 0199",
                   dysentery_policy_text="Give the antibiotic on the district list."),
    ClinicSettings(plan_b_table="imci", cholera_outbreak=True, iv_available=True,
                   zinc_days_min=14, zinc_days_max=14, zinc_max_age_months=None),
]


def _sign_space() -> list[tuple[dict, dict]]:
    """Every (signs, danger_signs) pair: 3 x 2 x 4 x 3 signs x 16 danger-sign patterns."""
    fields = {row["field"]: list(row["levels"]) for row in RULES["dehydration_signs"]["rows"]}
    dangers = RULES["danger_signs"]["inputs"]
    space = []
    for values in itertools.product(*fields.values()):
        for flags in itertools.product((False, True), repeat=len(dangers)):
            space.append((dict(zip(fields, values, strict=True)),
                          dict(zip(dangers, flags, strict=True))))
    return space


def _age_edges() -> list[float]:
    """Every age edge in the rulebook (months), WHO day edges in months, and either side."""
    edges: set[float] = set()

    def walk(node: object, key: str = "") -> None:
        if isinstance(node, dict):
            if key.endswith("age_months") and {"min", "below"} <= set(node):
                edges.update((node["min"], node["below"]))
            for k, v in node.items():
                walk(v, k)
        elif isinstance(node, list):
            for v in node:
                walk(v, key)
        elif (isinstance(node, int | float) and not isinstance(node, bool)
              and ("age_months" in key or key.endswith("_months"))):
            edges.add(node)

    walk(RULES)
    per_month = RULES["growth_days_per_month"]["value"]
    for day in (RULES["growth_height_table_from_age_days"]["value"],
                RULES["growth_max_age_days"]["value"]):
        edges.update((day / per_month, (day - 0.5) / per_month))
    ages = set()
    for edge in edges:
        ages.add(edge)
        ages.update(edge + e for e in EPSILONS)
        ages.update(edge - e for e in EPSILONS)
    return sorted(a for a in ages if 0 <= a < 1440)


def _weight_edges() -> list[float]:
    edges = {row["max_weight_kg"] for table in ("who2005", "imci")
             for row in RULES["plan_b_tables"][table]["rows"] if row["max_weight_kg"]}
    edges.update(RULES["maintenance_holliday_segar"]["band_upper_kg"])
    return sorted({round(w + d, 2) for w in edges for d in (-0.01, 0, 0.01)})


def _typical_weight(rng: random.Random, age: float) -> float:
    """A weight near the WHO median for the age (a broad guess beyond the WHO table)."""
    days = age_days(age)
    rows = tables_json()["wfa"]["female"]
    median = rows[days][1] if days < len(rows) else min(12 + age / 6, 70)
    return median * rng.uniform(0.65, 1.35)


def _number(value: float) -> float | int:
    """How a phone's JSON spells the number: integral values without a decimal point."""
    return int(value) if isinstance(value, float) and value.is_integer() else value


def _score_items(rng: random.Random) -> dict:
    scales = {"cds": "score_cds", "gorelick": "score_gorelick", "dhaka": "score_dhaka"}
    out = {}
    for scale, key in scales.items():
        if rng.random() < 0.5:
            points = RULES[key]["items"]["points"]
            items = {name: rng.choice(list(findings)) for name, findings in points.items()}
            if rng.random() < 0.25:   # an incomplete scale is not scored
                items.pop(rng.choice(list(items)))
            out[scale] = items
    return out


def _context(rng: random.Random) -> dict:
    options = {"iv_available": [True, False], "ng_trained": [True, False],
               "minutes_to_iv_facility": [0, 29, 30, 31, 120, None],
               "cholera_outbreak": [True, False], "cholera_in_area": [True, False]}
    return {k: rng.choice(v) for k, v in options.items() if rng.random() < 0.5}


def _valid_input(rng: random.Random, signs: dict, dangers: dict, ages: list, weights: list) -> dict:
    age = rng.choice(ages) if rng.random() < 0.5 else rng.choice(
        [rng.uniform(0, 60), rng.uniform(0, 1440), round(rng.uniform(0, 60), 2)])
    inp: dict = {"age_months": _number(age), "signs": dict(signs)}
    if any(dangers.values()) or rng.random() < 0.5:
        inp["danger_signs"] = {k: v for k, v in dangers.items() if v or rng.random() < 0.5}
    roll = rng.random()
    if roll < 0.6:
        inp["weight_kg"] = _number(round(max(0.5, _typical_weight(rng, age)), rng.choice((1, 2))))
    elif roll < 0.75:
        inp["weight_kg"] = rng.choice(weights)
    elif roll < 0.8:
        inp["weight_kg"] = _number(round(rng.uniform(0.5, 250), 1))
    if "weight_kg" in inp:
        if rng.random() < 0.2:
            inp["weight_estimated"] = True
        if rng.random() < 0.3:
            inp["confirm_implausible_weight"] = rng.random() < 0.7
    if rng.random() < 0.6:
        inp["sex"] = rng.choice(("female", "male"))
    if rng.random() < 0.5:
        inp["height_cm"] = _number(rng.choice([45, 64.3, 65, 65.7, 110, 110.7, 120, 120.7]) if
                                   rng.random() < 0.2 else round(rng.uniform(45, 125), 1))
        if rng.random() < 0.8:
            inp["height_measured_lying"] = rng.random() < 0.5
    if rng.random() < 0.5:
        inp["muac_mm"] = rng.choice([114, 115, 124, 125, rng.randint(90, 170)])
    if rng.random() < 0.1:
        inp["oedema_both_feet"] = rng.random() < 0.8
    if rng.random() < 0.6:
        inp["diarrhoea_days"] = rng.choice([0, 1, 3, 6, 7, 13, 14, 15, 30])
    if rng.random() < 0.2:
        inp["blood_in_stool"] = rng.random() < 0.8
    if rng.random() < 0.3:
        inp["score_items"] = _score_items(rng)
    if rng.random() < 0.2:
        inp["sodium_mmol_l"] = _number(rng.choice([120, 140, 140.5, 150, 150.5, 151, 165.3, 200]))
    if rng.random() < 0.3:
        inp["context"] = _context(rng)
    if age_months_young(age) and rng.random() < 0.7:
        inp["signs"].pop("drinking")   # not assessed under 2 months
    return inp


def age_months_young(age: float) -> bool:
    return age < RULES["young_infant_signs"]["max_age_months_exclusive"]


BAD_VALUES = ["12", True, [], {}, -1, 1e9, 0.25, "lethargic", None]
FIELDS = ["age_months", "weight_kg", "weight_estimated", "sex", "height_cm",
          "height_measured_lying", "muac_mm", "oedema_both_feet", "diarrhoea_days",
          "blood_in_stool", "sodium_mmol_l", "confirm_implausible_weight", "signs",
          "danger_signs", "context", "score_items", "constructor", "__proto__"]


def _bad_input(rng: random.Random, base: dict) -> object:
    """A valid input with one or two things broken (or not an object at all)."""
    inp = json.loads(json.dumps(base))
    kind = rng.random()
    if kind < 0.03:
        return rng.choice([[], "assess", 3, None])
    for _ in range(rng.choice((1, 2))):
        where = rng.random()
        if where < 0.55:
            inp[rng.choice(FIELDS)] = rng.choice(BAD_VALUES)
        elif where < 0.7 and isinstance(inp.get("signs"), dict):
            inp["signs"][rng.choice(["condition", "eyes", "drinking", "skin_pinch", "pulse"])] = (
                rng.choice(BAD_VALUES))
        elif where < 0.8:
            inp["context"] = {rng.choice(["iv_available", "minutes_to_iv_facility", "cup_ml"]):
                              rng.choice(BAD_VALUES + [12.5, 31])}
        elif where < 0.9:
            inp["score_items"] = rng.choice([
                {"cds": {"eyes": "closed"}}, {"cds": {"tears": 1}}, {"apgar": {}},
                {"dhaka": {"toString": "normal"}}, {"gorelick": "all normal"},
                {"dhaka": {"tears": None}}, {"cds": {"constructor": "normal"}}])
        else:
            inp["danger_signs"] = rng.choice([{"shock": "yes"}, {"fever": True}, []])
    return inp


def generate(seed: int = 20261202) -> list[tuple[int, object]]:
    """(settings index, input) pairs: the crossed sign space, then a share of bad inputs."""
    rng = random.Random(seed)
    ages, weights = _age_edges(), _weight_edges()
    cases: list[tuple[int, object]] = []
    for signs, dangers in _sign_space():
        for _ in range(SAMPLES_PER_COMBINATION):
            cases.append((rng.randrange(len(SETTINGS)),
                          _valid_input(rng, signs, dangers, ages, weights)))
    for signs, dangers in _sign_space():
        if not any(dangers.values()):
            cases.extend((rng.randrange(len(SETTINGS)),
                          _valid_input(rng, signs, dangers, ages, weights))
                         for _ in range(SAMPLES_WITHOUT_DANGER))
    bad = [(i, _bad_input(rng, inp)) for i, inp in rng.sample(cases, len(cases) // 10)]
    return cases + bad


def python_result(settings: ClinicSettings, inputs: object) -> dict:
    """What the server answers: the 200 body or the 422 error object, via JSON."""
    try:
        return json.loads(json.dumps(assess(inputs, settings)))
    except AssessmentInputError as exc:
        return exc.as_json()


def canonical(value: object) -> str:
    """The sync API's comparison text (storage.cases.canonical_json)."""
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False)


def differences(py: object, js: object, path: str = "$") -> list[str]:
    """Paths where the two JSON texts differ, including int 7 against float 7.0."""
    if isinstance(py, dict) and isinstance(js, dict):
        out = []
        for key in sorted(set(py) | set(js)):
            if key not in py or key not in js:
                out.append(f"{path}.{key}: only in {'python' if key in py else 'js'}")
            else:
                out.extend(differences(py[key], js[key], f"{path}.{key}"))
        return out
    if isinstance(py, list) and isinstance(js, list):
        if len(py) != len(js):
            return [f"{path}: {len(py)} items in python, {len(js)} in js"]
        return [d for i, (a, b) in enumerate(zip(py, js, strict=True))
                for d in differences(a, b, f"{path}[{i}]")]
    if canonical(py) != canonical(js):
        return [f"{path}: python {canonical(py)[:300]} != js {canonical(js)[:300]}"]
    return []


def run_node(tmp_path: Path, cases: list[tuple[int, object]]) -> list[object]:
    node = shutil.which("node")
    assert node, "node is needed for the parity test (make setup installs nodejs)"
    batch = tmp_path / "in.json"
    out = tmp_path / "out.json"
    batch.write_text(json.dumps({
        "rulebooks": [rulebook_json(s) for s in SETTINGS],
        "cases": [{"rulebook": i, "input": inp} for i, inp in cases]}))
    subprocess.run([node, str(RUNNER), str(batch), str(out)], check=True, cwd=ROOT)
    return json.loads(out.read_text())


def test_the_input_space_covers_signs_dangers_ages_and_both_plan_b_tables():
    cases = generate()
    assert len(cases) >= 10_000
    space = _sign_space()
    assert len(space) == 3 * 2 * 4 * 3 * 16
    seen = {(json.dumps(inp["signs"], sort_keys=True), json.dumps(inp.get("danger_signs", {})))
            for _, inp in cases[: len(space) * SAMPLES_PER_COMBINATION]}
    assert len(seen) >= len(space)
    tables = {SETTINGS[i].plan_b_table for i, _ in cases}
    assert tables == {"who2005", "imci"}
    # Age edges probed on both sides: young infant 2 m (S07), zinc 6 m (S04), SAM 6-59 m (S17),
    # Plan A and cholera 24 m (S03, S27).
    for edge in (2, 6, 24, 60):
        assert {edge - 1e-9, edge, edge + 1e-9} <= set(_age_edges())


def test_the_javascript_engine_matches_the_python_core_on_every_field(tmp_path):
    cases = generate()
    js_results = run_node(tmp_path, cases)
    assert len(js_results) == len(cases)
    failures = []
    outcomes = {"ok": 0, "invalid_input": 0, "implausible_weight": 0}
    for (index, inputs), js in zip(cases, js_results, strict=True):
        py = python_result(SETTINGS[index], inputs)
        outcomes[py["error"]["code"] if "error" in py else "ok"] += 1
        diff = differences(py, js)
        if diff:
            failures.append((index, inputs, diff))
    print(f"parity: {len(cases)} inputs compared, {len(failures)} differ; outcomes {outcomes}")
    report = "\n".join(f"settings #{i} input {json.dumps(inp)}\n  " + "\n  ".join(diff[:8])
                       for i, inp, diff in failures[:5])
    assert not failures, f"{len(failures)} of {len(cases)} inputs differ:\n{report}"
    assert outcomes["ok"] >= 9_000



ODD_VALUES = [
    {"score_items": {"cds": {"eyes": ["normal"]}}},
    {"score_items": {"dhaka": {"tears": {"absent": True}}}},
    {"muac_mm": 10 ** 400},
    {"age_months": 10 ** 400},
    {"diarrhoea_days": -(10 ** 400)},
]


@pytest.mark.parametrize("extra", ODD_VALUES, ids=["list-finding", "object-finding",
                                                   "huge-muac", "huge-age", "huge-negative-days"])
def test_both_engines_answer_422_for_values_json_allows_but_the_contract_does_not(tmp_path, extra):
    inputs = {"age_months": 30, "signs": {"condition": "well", "eyes": "normal",
                                          "drinking": "normal", "skin_pinch": "quick"}, **extra}
    [js] = run_node(tmp_path, [(0, inputs)])
    py = python_result(SETTINGS[0], inputs)
    assert py["error"]["code"] == "invalid_input"
    assert differences(py, js) == []
