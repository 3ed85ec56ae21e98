"""Surveillance constants, each beside its source.

Choice of home: these are *surveillance* thresholds (statistical alarm levels, outbreak-alert
counts and windows, reporting age bands, stock arithmetic), not numbers that change what is
done for a patient, so they live here rather than in ``clinic_app/clinical/rulebook.py``.
The one clinical-looking number, the 4-hour Plan B reassessment time, is used here only to
define a quality indicator window; the treatment itself reads its own value from the rulebook.

Source ids:
- ``R-EARSC``: R package ``surveillance``, ``man/earsC.Rd`` and ``R/earsC.R`` (v1.20.3 in
  Debian, v1.23.1 read), citing Fricker, Hegler & Dunfee, Stat Med 2008;27:3407-29 and
  Salmon, Schumacher & Hoehle, J Stat Softw 2016;70(10). Reference note
  growth-and-surveillance.md §B1.
- ``S27``: GTFCC cholera surveillance guidance (clinical-facts.md §11.1; reference note §B3.1).
- ``S02``: summaries of WHO 2005 dehydration management ("after four hours, reassess").
- ``ISSUE-7``: the project's own issue text (reporting bands, indicator definitions).
- ``PRACTICE``: common practice, no published source.
"""

from __future__ import annotations

# --- EARS C1/C2/C3 (R-EARSC) -------------------------------------------------------------
# Baseline length b = 7 periods; C2/C3 skip a 2-period guard band (t-9 .. t-3).
EARS_BASELINE = 7  # R-EARSC: control$baseline default 7
EARS_GUARD_BAND = 2  # R-EARSC: "2-day lag in the baseline definition"
# Alarm levels: we use the exact normal quantiles of R's documented alpha values
# (qnorm(1 - alpha): 3.0902 for C1/C2, 1.9600 for C3) rather than the rounded classic 3/3/2
# (Hutwagner et al. 2003, from memory). Reason: the alpha values are verified in R-EARSC
# ("These different choices are the one made at the CDC") and make our alarms comparable,
# week by week, with R's earsC output.
EARS_ALPHA_C1 = 0.001  # R-EARSC: "Z(1-zAlpha) of about 3"
EARS_ALPHA_C2 = 0.001  # R-EARSC
EARS_ALPHA_C3 = 0.025  # R-EARSC: "about 2"
# Sparse data: the SD used is max(sample SD, minSigma), as in R's earsC (pmax(sd, minSigma)).
# R defaults to 0, which leaves C1/C2 undefined for a constant baseline; Burkom suggests
# 0.5 or 1 for sparse data (quoted in R-EARSC). We take 0.5, the more sensitive of the two.
EARS_MIN_SIGMA = 0.5  # R-EARSC (Burkom's suggestion quoted in man/earsC.Rd)

# --- GTFCC cholera alert (S27) -------------------------------------------------------------
CHOLERA_SUSPECT_MIN_AGE_MONTHS = 24  # S27: "aged 2 years or older"
CHOLERA_CLUSTER_MIN_CASES = 2  # S27: "two or more people ... from the same area"
CHOLERA_CLUSTER_WINDOW_DAYS = 7  # S27: "within 1 week of one another" / "within seven days"
CHOLERA_DEATH_MIN_AGE_MONTHS = 60  # S27: "one death ... in a person aged 5 years or older"

# --- Reporting age groups (ISSUE-7) ---------------------------------------------------------
# (key, lower bound in months inclusive, upper bound in months exclusive or None)
AGE_GROUPS: tuple[tuple[str, int, int | None], ...] = (
    ("lt2m", 0, 2),  # ISSUE-7: under 2 months
    ("m2_11", 2, 12),  # ISSUE-7: 2-11 months
    ("m12_59", 12, 60),  # ISSUE-7: 12-59 months
    ("y5_14", 60, 180),  # ISSUE-7: 5-14 years
    ("y15plus", 180, None),  # ISSUE-7: 15 years and over
)

# --- Quality indicators ---------------------------------------------------------------------
QI_REASSESS_AFTER_HOURS = 4.0  # S02: "after four hours, reassess the child fully"
QI_REASSESS_TOLERANCE_HOURS = 1.0  # ISSUE-7: "within 4 hours +/- 1 hour"

# --- Supplies ---------------------------------------------------------------------------------
STOCK_AVERAGE_WEEKS = 4  # PRACTICE: recent average use over the last 4 complete weeks
STOCK_LOW_WEEKS_DEFAULT = 4.0  # PRACTICE: default low-stock threshold (configurable)
