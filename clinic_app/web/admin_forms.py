"""Forms of the admin pages (Flask-WTF, so every POST carries a CSRF token)."""

from __future__ import annotations

from flask_wtf import FlaskForm
from wtforms import (
    BooleanField,
    SelectField,
    SelectMultipleField,
    StringField,
    TextAreaField,
)
from wtforms.validators import (
    DataRequired,
    InputRequired,
    Length,
    NumberRange,
    Optional,
    Regexp,
    ValidationError,
)

from clinic_app.clinical.rulebook import RULES
from clinic_app.i18n import lazy_gettext
from clinic_app.storage import users
from clinic_app.web.fields import IntegerField


def plan_b_choices() -> list[tuple[str, str]]:
    """The Plan B tables the rulebook holds, as (key, label)."""
    tables = RULES["plan_b_tables"]
    return [(key, value.get("label", key)) for key, value in tables.items()
            if isinstance(value, dict) and "rows" in value]


def maintenance_choices() -> list[tuple[int, str]]:
    """Above-20-kg maintenance rates the rulebook names: the original and the variant."""
    original = RULES["maintenance_holliday_segar"]["ml_per_kg_per_day"][-1]
    variant = RULES["maintenance_above_20kg_variant_ml_per_kg"]["value"]
    return [(original, lazy_gettext("%(n)s ml/kg/day (Holliday-Segar original)", n=original)),
            (variant, lazy_gettext("%(n)s ml/kg/day (variant)", n=variant))]


class SettingsForm(FlaskForm):
    # Non-clinical (clinic profile)
    clinic_name = StringField(lazy_gettext("Clinic name"), validators=[Length(max=120)])
    clinic_phone = StringField(
        lazy_gettext("Clinic phone"),
        validators=[Length(max=40), Regexp(r"^[0-9+()\- ]*$",
                                           message=lazy_gettext("Digits, spaces, + ( ) - only."))])
    stock_alert_weeks = IntegerField(
        lazy_gettext("Stock alert threshold (weeks of stock left)"),
        validators=[InputRequired(), NumberRange(min=0)])
    default_languages = SelectMultipleField(lazy_gettext("Default languages"),
                                            validators=[DataRequired()])
    # Clinical settings (ClinicSettings; they change the rulebook version)
    referral_facility_name = StringField(lazy_gettext("Referral facility"),
                                         validators=[Length(max=120)])
    referral_facility_phone = StringField(
        lazy_gettext("Referral facility phone"),
        validators=[Length(max=40), Regexp(r"^[0-9+()\- ]*$",
                                           message=lazy_gettext("Digits, spaces, + ( ) - only."))])
    plan_b_table = SelectField(lazy_gettext("Plan B table"), validators=[DataRequired()])
    iv_available = BooleanField(lazy_gettext("IV fluids available here"))
    ng_trained = BooleanField(lazy_gettext("Staff trained in nasogastric rehydration"))
    minutes_to_iv_facility = IntegerField(
        lazy_gettext("Minutes to the IV facility (leave empty if unknown)"),
        validators=[Optional(), NumberRange(min=0)])
    cholera_outbreak = BooleanField(lazy_gettext("Cholera outbreak declared"))
    cholera_in_area = BooleanField(lazy_gettext("Cholera in the area"))
    zinc_days_min = IntegerField(lazy_gettext("Zinc: fewest days"),
                                 validators=[InputRequired(), NumberRange(min=1)])
    zinc_days_max = IntegerField(lazy_gettext("Zinc: most days"),
                                 validators=[InputRequired(), NumberRange(min=1)])
    zinc_max_age_months = IntegerField(
        lazy_gettext("Zinc: up to age in months (leave empty for no upper age)"),
        validators=[Optional(), NumberRange(min=3, max=1440)])
    dysentery_policy_text = TextAreaField(lazy_gettext("Dysentery antibiotic policy"),
                                          validators=[DataRequired(), Length(max=600)])
    maintenance_above_20kg_ml_per_kg = SelectField(
        lazy_gettext("Maintenance fluid above 20 kg"), coerce=int)
    cup_ml = IntegerField(lazy_gettext("Cup size for caregivers (ml)"),
                          validators=[InputRequired(), NumberRange(min=1)])

    def validate_zinc_days_max(self, field):
        if self.zinc_days_min.data is not None and field.data is not None \
                and field.data < self.zinc_days_min.data:
            raise ValidationError(lazy_gettext("Must not be fewer than the fewest days."))


class NewUserForm(FlaskForm):
    username = StringField(lazy_gettext("User name"), validators=[
        DataRequired(), Length(min=2, max=64),
        Regexp(r"^[A-Za-z0-9._-]+$",
               message=lazy_gettext("Letters, digits, dot, dash and underscore only."))])
    display_name = StringField(lazy_gettext("Full name"), validators=[Length(max=120)])
    role = SelectField(lazy_gettext("Role"), choices=list(users.ROLES),
                       validators=[DataRequired()])
    area = StringField(lazy_gettext("Village or area"), validators=[Length(max=120)])
