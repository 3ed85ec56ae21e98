"""The server's result texts and the phone's are the same, for every golden vector.

clinic_app/web/assess_view.py and static/js/pages/assess_view.js hold the same templates and
arithmetic (cups, spoons, the input built from the form); node runs the JS over the same data.
"""

from __future__ import annotations

import json
import shutil
import subprocess
from dataclasses import asdict
from pathlib import Path

import pytest

from clinic_app.clinical.rulebook import RULES
from clinic_app.clinical.types import ClinicSettings
from clinic_app.web.assess_view import build_input, present, words

ROOT = Path(__file__).resolve().parents[2]
VECTORS = json.loads((ROOT / "tests" / "vectors" / "assessments.json").read_text())

NODE_SCRIPT = """
import { readFileSync } from "node:fs";
import { buildInput, present } from "MODULE_URL";
const data = JSON.parse(readFileSync(0, "utf8"));
const out = {
  views: data.results.map(([result, age]) =>
    present(result, data.settings, age, data.rules, data.words)),
  inputs: data.forms.map((form) => buildInput(form, data.rules)),
};
process.stdout.write(JSON.stringify(out));
""".replace("MODULE_URL", (ROOT / "static" / "js" / "pages" / "assess_view.js").as_uri())

FORMS = [
    {"age_value": "5", "age_unit": "weeks", "condition": "well", "eyes": "normal",
     "skin_pinch": "quick", "weight_kg": "4.2", "sex": "female"},
    {"age_value": "2.5", "age_unit": "years", "condition": "restless", "eyes": "sunken",
     "drinking": "eager", "skin_pinch": "slow", "weight_kg": "12", "no_scale": "y",
     "muac_mm": "118", "diarrhoea_days": "15", "blood_in_stool": "y", "shock": "y"},
    {"age_value": "7", "age_unit": "months", "condition": "lethargic", "eyes": "sunken",
     "drinking": "poor", "skin_pinch": "very_slow", "oedema_both_feet": "y",
     "confirm_implausible_weight": "y", "weight_kg": "30"},
]


@pytest.mark.skipif(shutil.which("node") is None, reason="node is missing: run `make setup`")
def test_the_phone_and_the_server_say_the_same_for_every_vector(app):
    settings = ClinicSettings(referral_facility_name="Siwelo District Hospital",
                              referral_facility_phone="0977 000 111", cup_ml=250)
    results = [(v["expected"], v["input"]["age_months"]) for v in VECTORS
               if "severity" in v["expected"]]
    assert len(results) >= 100
    with app.test_request_context():
        w = words()
        want_views = [present(result, settings, age) for result, age in results]
    want_inputs = [build_input(form) for form in FORMS]
    data = {"results": results, "settings": asdict(settings), "rules": RULES, "words": w,
            "forms": FORMS}
    done = subprocess.run(["node", "--input-type=module", "-e", NODE_SCRIPT],
                          input=json.dumps(data), capture_output=True, text=True, timeout=60,
                          check=True)
    got = json.loads(done.stdout)
    assert got["views"] == want_views
    assert got["inputs"] == want_inputs
