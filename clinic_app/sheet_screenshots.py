"""``make screenshots``: PNGs of the A4 caregiver sheet in English, Swahili, Hindi and Arabic.

Renders the sheet of one invented example child (14 months, 9 kg, some dehydration) through
the same template and PDF path as the web app, on a throw-away database, then converts each
PDF page to PNG with pdftoppm (poppler-utils).

    python -m clinic_app.sheet_screenshots screenshots/
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
from datetime import date
from pathlib import Path

LANGUAGES = ("en", "sw", "hi", "ar")
EXAMPLE_INPUT = {"age_months": 14, "weight_kg": 9, "sex": "female",
                 "signs": {"condition": "restless", "eyes": "sunken", "drinking": "eager",
                           "skin_pinch": "slow"}}
EXAMPLE_DAY = date(2026, 3, 2)


def sheet_pdfs(languages=LANGUAGES, size: str = "a4") -> dict[str, bytes]:
    """{lang: PDF bytes} of the example child's sheet, rendered by the app's own code."""
    from clinic_app import caregiver_sheet, create_app
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import ClinicSettings
    from clinic_app.web.sheets import sheet_pdf

    settings = ClinicSettings(referral_facility_name="Mbeza District Hospital",
                              referral_facility_phone="+000 555 0100")
    clinic = caregiver_sheet.ClinicInfo(name="Kantolo Health Post", phone="+000 555 0123")
    result = assess(EXAMPLE_INPUT, settings)
    out = {}
    with tempfile.TemporaryDirectory() as tmp:
        app = create_app({"DATABASE": str(Path(tmp) / "shots.sqlite3"),
                          "SECRET_KEY": "screenshots"})
        with app.test_request_context("/"):
            for lang in languages:
                sheet = caregiver_sheet.build(result, age_months=EXAMPLE_INPUT["age_months"],
                                              settings=settings, locale=lang,
                                              seen_on=EXAMPLE_DAY, clinic=clinic)
                out[lang] = sheet_pdf(sheet, lang, size)
    return out


def main(target: str) -> int:
    folder = Path(target)
    folder.mkdir(parents=True, exist_ok=True)
    for lang, data in sheet_pdfs().items():
        pdf_path = folder / f"sheet-a4-{lang}.pdf"
        pdf_path.write_bytes(data)
        subprocess.run(["pdftoppm", "-r", "110", "-png", str(pdf_path),
                        str(folder / f"sheet-a4-{lang}")], check=True)
        print(f"wrote {folder}/sheet-a4-{lang}-*.png")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1] if len(sys.argv) > 1 else "screenshots"))
