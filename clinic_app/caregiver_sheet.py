"""The caregiver sheet's content: one assessment result turned into what the page shows.

Everything clinical comes from the assessment result (issue 3 body) or from the rulebook; this
module only converts it into the clinic's cup size and spoons, and formats every number, unit
and date in the caregiver's language with Babel. The same dict feeds the PDF, the printable
HTML page, and (as JSON) the phone's offline copy of the sheet.
"""

from __future__ import annotations

import functools
import hashlib
import json
import math
from dataclasses import asdict, dataclass
from datetime import date, timedelta

from babel.dates import format_date
from babel.numbers import format_decimal
from babel.units import format_unit

from clinic_app.clinical.rulebook import RULES
from clinic_app.clinical.types import ClinicSettings

# Cups are shown to the nearest quarter: the finest amount a caregiver can judge by eye.
# This is a display precision, not a clinical number.
CUP_QUARTERS = 4
PAGE_SIZES = ("a4", "letter", "a5")

# The danger signs printed under "come back at once if" (WHO 2005 home-care wording, S02, plus
# the IMCI "not able to drink or breastfeed"), in print order; each has its own pictogram.
RETURN_SIGNS = ("watery_stools", "vomiting", "thirsty", "not_drinking", "fever", "blood",
                "not_better")


@dataclass(frozen=True)
class ClinicInfo:
    """The non-clinical facts printed in the footer."""

    name: str = ""
    phone: str = ""


def rule(key: str) -> int:
    return RULES[key]["value"]


# Formatting a number through Babel costs more than building the rest of the sheet; the
# answers depend only on the arguments, and a clinic uses few volumes and few languages.
@functools.lru_cache(maxsize=4096, typed=True)
def ml(value: float, locale: str) -> str:
    """A volume in millilitres, as the locale writes it (e.g. "1 200 ml", "mililita 675")."""
    return format_unit(int(value), "volume-milliliter", length="short", locale=locale)


@functools.lru_cache(maxsize=4096, typed=True)
def number(value: float, locale: str) -> str:
    return format_decimal(value, locale=locale)


def cups(volume_ml: float, cup_ml: int) -> float:
    """The volume in cups of the clinic's size, to the nearest quarter (at least a quarter)."""
    quarters = max(1, math.floor(volume_ml / cup_ml * CUP_QUARTERS + 0.5))
    return quarters / CUP_QUARTERS


def cup_pictures(volume_ml: float, cup_ml: int) -> list[dict]:
    """The cups to draw, e.g. 1.75 cups -> a full cup and a cup three quarters full.

    Each fill has its own pictogram (static/icons/sheet/cup_25.svg ... cup_100.svg): a
    picture file is parsed once per process and its drawing reused by the PDF renderer,
    where a drawing inside the page was parsed and drawn again for every sheet.
    """
    amount = cups(volume_ml, cup_ml)
    full = int(amount)
    fills = [1.0] * full + ([amount - full] if amount > full else [])
    return [{"fill": f, "icon": f"cup_{round(f * 100)}"} for f in fills]


def spoons(volume_ml: float) -> int:
    return max(1, math.floor(volume_ml / rule("teaspoon_ml") + 0.5))


def _amount(volume_ml: float, settings: ClinicSettings, locale: str, with_spoons: bool) -> dict:
    return {"ml": ml(volume_ml, locale),
            "cups": number(cups(volume_ml, settings.cup_ml), locale),
            "cup_fills": cup_pictures(volume_ml, settings.cup_ml),
            "spoons": number(spoons(volume_ml), locale) if with_spoons else None}


def _per_stool(result: dict, age_months: float) -> dict:
    if result.get("per_stool_ml"):
        return result["per_stool_ml"]
    from clinic_app.clinical import plans

    return plans.per_stool(age_months)


def zinc_tablets(mg_per_day: int) -> float:
    return mg_per_day / rule("sheet_zinc_tablet_mg")


def build(result: dict, *, age_months: float, settings: ClinicSettings, locale: str,
          seen_on: date, clinic: ClinicInfo) -> dict:
    """The sheet's content for one assessment result, formatted for ``locale``."""
    small = age_months < rule("spoons_max_age_months")
    sheet: dict = {
        "plan": result.get("plan"), "refer": result.get("refer", "none"),
        "small_child": small, "locale": locale,
        "cup": ml(settings.cup_ml, locale),
        "spoon": ml(rule("teaspoon_ml"), locale),
        "water": format_unit(rule("sheet_ors_water_ml_per_sachet") / 1000, "volume-liter",
                             length="long", locale=locale),
        "keep_hours": number(rule("sheet_ors_keep_hours"), locale),
        "spoon_every": {k: number(RULES["sheet_spoon_every_minutes"][k], locale)
                        for k in ("low", "high")},
        "vomit_wait_minutes": number(RULES["vomiting_wait_minutes"]["value"], locale),
        "not_better_days": number(rule("sheet_return_if_not_better_days"), locale),
        "seen_on": format_date(seen_on, format="long", locale=locale),
        "follow_up": format_date(seen_on + timedelta(days=rule("sheet_follow_up_days")),
                                 format="full", locale=locale),
        "clinic": {"name": clinic.name, "phone": clinic.phone},
        "referral": {"name": settings.referral_facility_name,
                     "phone": settings.referral_facility_phone},
        "return_signs": list(RETURN_SIGNS),
    }
    ors = result.get("ors")
    if ors and ors.get("total_ml"):
        hourly = (ors.get("hourly_ml") or [ors["total_ml"] / ors["hours"]])[0]
        sheet["clinic_ors"] = {"total": _amount(ors["total_ml"], settings, locale, False),
                               "hours": number(ors["hours"], locale),
                               "hourly": _amount(hourly, settings, locale, small)}
    per_stool = _per_stool(result, age_months)
    if per_stool.get("as_much_as_wanted"):
        sheet["per_stool"] = None
    else:
        sheet["per_stool"] = {"low": _amount(per_stool["low_ml"], settings, locale, small),
                              "high": _amount(per_stool["high_ml"], settings, locale, small)}
    home = result.get("home_ors_ml_per_day")
    if home:
        sachets = math.ceil(home / rule("sheet_ors_water_ml_per_sachet"))
        sheet["home_ors"] = {"ml": ml(home, locale), "sachets": number(sachets, locale),
                             "sachets_n": sachets}
    zinc = result.get("zinc")
    if zinc:
        tablets = zinc_tablets(zinc["mg_per_day"])
        sheet["zinc"] = {"tablets": number(tablets, locale), "half": tablets < 1,
                         "mg": number(zinc["mg_per_day"], locale),
                         "days_min": number(zinc["days_min"], locale),
                         "days_max": number(zinc["days_max"], locale),
                         "boxes": [number(d, locale) for d in range(1, zinc["days_max"] + 1)],
                         "required": zinc["days_min"]}
    return sheet


def settings_version(settings: ClinicSettings, clinic: ClinicInfo) -> str:
    """A short hash of everything outside the case that changes the printed sheet."""
    payload = json.dumps([asdict(settings), asdict(clinic)], sort_keys=True)
    return hashlib.sha256(payload.encode()).hexdigest()[:16]
