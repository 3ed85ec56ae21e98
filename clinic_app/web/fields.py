"""Form fields shared by the HTML forms."""

from __future__ import annotations

from wtforms import IntegerField as _WTFormsIntegerField

# Far beyond any count, volume or setting a clinic form asks for.
MAX_DIGITS = 12


class IntegerField(_WTFormsIntegerField):
    """WTForms' IntegerField, refusing absurdly long numbers as an ordinary field error.

    WTForms' NumberRange compares through ``math.isnan``, which raises OverflowError (a server
    error) on an integer with more than about 300 digits; found by tests/reliability/
    test_fuzz_forms.py.
    """

    def process_formdata(self, valuelist):
        if valuelist and isinstance(valuelist[0], str) and \
                len(valuelist[0].strip().lstrip("+-")) > MAX_DIGITS:
            self.data = None
            raise ValueError(self.invalid_value_message
                             or self.gettext("Not a valid integer value."))
        super().process_formdata(valuelist)
