"""Pure clinical core: plain functions and frozen dataclasses, no I/O. See README.md."""

from .assess import assess
from .rulebook import rulebook_json
from .types import AssessmentInputError, ClinicSettings

__all__ = ["AssessmentInputError", "ClinicSettings", "assess", "rulebook_json"]
