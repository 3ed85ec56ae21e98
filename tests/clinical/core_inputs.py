"""Input builders for the clinical-core tests (plain functions, no fixtures)."""

from __future__ import annotations

from clinic_app.clinical import ClinicSettings, assess

WELL = {"condition": "well", "eyes": "normal", "drinking": "normal", "skin_pinch": "quick"}
SOME = {"condition": "restless", "eyes": "sunken", "drinking": "eager", "skin_pinch": "slow"}
# Severe without any danger sign: sunken eyes, drinks poorly, very slow pinch.
SEVERE = {"condition": "restless", "eyes": "sunken", "drinking": "poor", "skin_pinch": "very_slow"}
YOUNG_WELL = {"condition": "well", "eyes": "normal", "skin_pinch": "quick"}

DEFAULT = ClinicSettings()


def case(age: float = 30, weight: float | None = None, signs: dict | None = None, **extra) -> dict:
    """An assessment input: age in months, optional weight, signs (default: well)."""
    inputs: dict = {"age_months": age, "signs": dict(signs or WELL)}
    if weight is not None:
        inputs["weight_kg"] = weight
    inputs.update(extra)
    return inputs


def run(inputs: dict, **settings) -> dict:
    """assess() with default clinic settings, overridden by keyword."""
    return assess(inputs, ClinicSettings(**settings))


def codes(items: list[dict]) -> list[str]:
    return [item["code"] for item in items]
