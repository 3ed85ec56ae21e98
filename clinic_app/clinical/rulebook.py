"""The rulebook: every clinical table and threshold, each beside its source id.

Source ids refer to SOURCES below (the project's source register). A value marked
``"status": "unconfirmed"`` was taken from memory of the named source and has not been
checked against a retrieved copy of it; the engines show it as unconfirmed.

The Python core and the offline JavaScript engine (static/js/engine.js) both read these
values: the JSON export (``rulebook_json``) is what the phone applies.
"""

from __future__ import annotations

SOURCES: dict[str, str] = {
    "S01": "WHO 2005, The treatment of diarrhoea: a manual for physicians and other senior health workers, 4th rev.",
    "S02": "Summaries of WHO 2005 dehydration management (WHO scale, Plans A, B, C)",
    "S03": "CDC cholera rehydration therapy page (reproduces WHO Plans A/B, 24-h IV schedule)",
    "S04": "IMCI chart booklet Plans A/B/C as reproduced in the Ethiopian FMoH / OU HEAT IMNCI module",
    "S05": "BMJ 2013;347:f7204 Table 1 (reproduces WHO dehydration table)",
    "S07": "IMNCI training text and recording form",
    "S08": "WHO Pocket book of hospital care for children, 2nd ed. 2013",
    "S09": "BMJ Open table adapted from WHO Pocket book 2013 and Kenya Basic Paediatric Protocols 2016",
    "S10": "Open Forum Infect Dis 2024 tables summarising WHO-indicated treatment",
    "S11": "MSF Clinical guidelines, Dehydration and Appendix 2",
    "S14": "Child Healthcare (South African primary-care handbook)",
    "S15": "WHO/UNICEF joint statement Clinical management of acute diarrhoea (2004)",
    "S16": "WHO/UNICEF reduced-osmolarity ORS composition (WHO/FCH/CAH/06.1, 2006)",
    "S17": "WHO/UNICEF 2009 joint statement on WHO growth standards and identification of SAM",
    "S18": "WHO 2013 Guideline: updates on the management of SAM in infants and children",
    "S19": "WHO 2003 Guidelines for the inpatient treatment of severely malnourished children",
    "S20": "Inter-agency malnutrition FAQ summarising WHO inpatient guidance (SAM shock)",
    "S21": "Friedman JN et al. J Pediatr 2004;145:201-7 (Clinical Dehydration Scale)",
    "S22": "Goldman RD, Friedman JN, Parkin PC. Pediatrics 2008;122:545-9",
    "S23": "BMC Pediatr 2014;14:149 Table 1 (CDS items and bands)",
    "S24": "Gorelick MH, Shaw KN, Murphy KO. Pediatrics 1997;99(5):e6",
    "S25": "Levine AC et al. Glob Health Sci Pract 2015;3(3):405-18 (DHAKA score)",
    "S26": "Holliday MA, Segar WE. Pediatrics 1957;19(5):823-32",
    "S27": "GTFCC cholera outbreak response field manual and surveillance guidance",
    "S28": "Harris JB et al. Cholera. Lancet 2012;379:2466-76, Table 2",
    "S29": "APLS and Best Guess weight-from-age formulas (Flannigan 2014; Tinning & Acworth 2007)",
    "S30": "NICE CG84 Diarrhoea and vomiting caused by gastroenteritis in under 5s (2009)",
    "S31": "Hypernatraemia correction references (free water deficit, TBW fractions)",
    "S33": "Body-water references (Friis-Hansen 1961)",
    "WHO-MGRS-2006": "WHO Child Growth Standards 2006, LMS tables and anthro z-score method (SD23 rule)",
    "PRACTICE": "Common practice, no published source",
}

# Owned by the "core" helper: classification, danger signs, plans A/B/C, NG, IV, zinc,
# SAM cut-offs and ReSoMal schedule, cholera, dysentery, persistent diarrhoea, messages,
# rounding precision, input limits.
_CORE: dict = {}

# Owned by the "growth" helper: z-score flags, Holliday-Segar, 4-2-1, weight-from-age,
# TBW fractions, free-water deficit, CDS/Gorelick/DHAKA definitions and bands.
_GROWTH_SCORES_FLUIDS: dict = {}

RULES: dict = {**_CORE, **_GROWTH_SCORES_FLUIDS}
