"""Print the Python caregiver-sheet content for example cases, for the JavaScript twin's test.

Output: {"rules": RULES, "settings": ClinicSettings, "cases": [{"record", "sheets": {lang: dict}}]}
"""

from __future__ import annotations

import json
import sys
from dataclasses import asdict
from datetime import date
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))
from clinic_app import caregiver_sheet  # noqa: E402
from clinic_app.clinical.assess import assess  # noqa: E402
from clinic_app.clinical.rulebook import RULES  # noqa: E402
from clinic_app.clinical.types import ClinicSettings  # noqa: E402

SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
NONE = {"condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"}
INPUTS = [{"age_months": 40, "weight_kg": 16, "signs": SOME},
          {"age_months": 4, "weight_kg": 6, "signs": NONE},
          {"age_months": 130, "weight_kg": 30, "signs": NONE}]
LANGS = ("en", "fr", "pt", "es", "sw", "hi", "ar")

settings = ClinicSettings(cup_ml=250, referral_facility_name="Mbeza District Hospital")
cases = []
for inputs in INPUTS:
    result = assess(inputs, settings)
    record = {"input": inputs, "result": result, "created_at": "2026-03-02T08:00:00Z"}
    sheets = {lang: caregiver_sheet.build(result, age_months=inputs["age_months"],
                                          settings=settings, locale=lang,
                                          seen_on=date(2026, 3, 2),
                                          clinic=caregiver_sheet.ClinicInfo())
              for lang in LANGS}
    cases.append({"record": record, "sheets": sheets})
print(json.dumps({"rules": RULES, "settings": asdict(settings), "cases": cases}))
