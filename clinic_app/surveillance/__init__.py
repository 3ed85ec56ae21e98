"""Pure surveillance methods (stdlib only): ISO weeks, EARS C1-C3, alert rules, stock, quality.

See README.md in this folder for the rule; thresholds live in ``rules.py``.
"""
