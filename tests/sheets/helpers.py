"""Shared by the sheet tests: an example child whose volumes show each locale's number format."""

from __future__ import annotations

# A 40-month-old of 16 kg with some dehydration: Plan B 75 ml/kg = 1200 ml over 4 hours
# (S04 IMCI Plan B, 75 ml/kg), 300 ml an hour; per loose stool 100-200 ml at 2 to <10 years
# (S03 WHO 2005 Plan A table); home ORS up to 1000 ml a day (S03).
SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
CHILD = {"age_months": 40, "weight_kg": 16, "signs": SOME}

# 1200 ml as each locale writes the number (CLDR via Babel; French groups with U+202F).
TOTAL_1200 = {"en": "1,200", "fr": "1\u202f200", "pt": "1.200", "es": "1.200", "sw": "1,200",
              "hi": "1,200", "ar": "1,200"}

# A phrase of the sheet in each language, and a character range of its script.
KEY_PHRASE = {"en": "Mix the ORS", "fr": "Préparer la SRO", "pt": "Preparar a SRO",
              "es": "Preparar el SRO", "sw": "Changanya ORS", "hi": "ओआरएस घोलें",
              "ar": "حضّر محلول الإرواء"}
SCRIPT = {"hi": ("\u0900", "\u097f"), "ar": ("\u0600", "\u06ff")}
LANGUAGES = tuple(KEY_PHRASE)


def quick_sheet(client, token, lang, *, fmt="html", size="a4", child=CHILD):
    return client.post("/sheet/quick", json={"input": child, "lang": lang, "size": size,
                                             "format": fmt},
                       headers={"X-CSRFToken": token})
