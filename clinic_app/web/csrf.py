"""The app's one CSRFProtect instance (form token, or X-CSRFToken on JSON requests)."""

from flask_wtf.csrf import CSRFProtect

csrf = CSRFProtect()
