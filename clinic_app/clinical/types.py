"""Frozen value types of the clinical core: clinic settings, validated input, input errors."""

from __future__ import annotations

from dataclasses import dataclass, field

from .rulebook import RULES


@dataclass(frozen=True)
class ClinicSettings:
    """The clinic's standing choices; an assessment's ``context`` overrides some of them."""

    plan_b_table: str = "who2005"          # or "imci"
    iv_available: bool = False
    ng_trained: bool = False
    minutes_to_iv_facility: int | None = None
    cholera_outbreak: bool = False
    cholera_in_area: bool = False
    zinc_days_min: int = RULES["zinc_days"]["min"]
    zinc_days_max: int = RULES["zinc_days"]["max"]
    zinc_max_age_months: int | None = RULES["zinc_max_age_months"]["value"]  # None: no limit
    referral_facility_name: str = ""
    referral_facility_phone: str = ""
    dysentery_policy_text: str = "Give the oral antibiotic for dysentery set by national policy."
    # Holliday-Segar original above 20 kg (the last band); 25 is the variant.
    maintenance_above_20kg_ml_per_kg: int = RULES["maintenance_holliday_segar"]["ml_per_kg_per_day"][-1]
    cup_ml: int = RULES["cup_ml"]["value"]


@dataclass(frozen=True)
class AssessInput:
    """One validated assessment input. Absent optional values are None (booleans: False)."""

    age_months: float
    signs: tuple[tuple[str, str], ...]
    danger_signs: tuple[str, ...] = ()
    weight_kg: float | None = None
    weight_estimated: bool = False
    sex: str | None = None
    height_cm: float | None = None
    height_measured_lying: bool | None = None
    muac_mm: int | None = None
    oedema_both_feet: bool = False
    diarrhoea_days: int | None = None
    blood_in_stool: bool = False
    sodium_mmol_l: float | None = None
    confirm_implausible_weight: bool = False
    context: tuple[tuple[str, object], ...] = ()
    raw: dict = field(default_factory=dict, compare=False, hash=False)

    def sign(self, name: str) -> str | None:
        """The value entered for one of the four signs (None if not entered)."""
        return dict(self.signs).get(name)


class AssessmentInputError(ValueError):
    """Bad assessment input. ``code`` is "invalid_input" or "implausible_weight"."""

    def __init__(self, code: str, fields: dict[str, str]):
        super().__init__(f"{code}: {fields}")
        self.code = code
        self.fields = fields

    def as_json(self) -> dict:
        """The 422 body: {"error": {"code", "fields"}}."""
        return {"error": {"code": self.code, "fields": dict(self.fields)}}
