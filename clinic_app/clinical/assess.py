"""assess(): the whole assessment, from the raw JSON input to the 200 JSON body.

The steps read like the chart: classify, pick the plan, work out volumes, list the actions
and cautions (collected as {code: params}, then put in the RULES order and rendered).
"""

from __future__ import annotations

from dataclasses import replace

from . import classify, fluids, growth, plans, scores
from .messages import facility, ordered, render, round_volume, text_entry
from .rulebook import RULES, rulebook_version
from .types import AssessInput, ClinicSettings
from .validate import check_weight_plausible, validate, weight_is_implausible

PLAN_BY_SEVERITY = {"none": "A", "some": "B", "severe": "C"}
SEVERITY_CODES = {"none": "no_dehydration", "some": "some_dehydration",
                  "severe": "severe_dehydration"}


def assess(inputs: dict, settings: ClinicSettings) -> dict:
    """Assess one patient. Raises AssessmentInputError for bad or implausible input."""
    inp = validate(inputs)
    check_weight_plausible(inp)
    effective = replace(settings, **dict(inp.context))
    result = _plain_numbers(_Assessment(inp, effective).run())
    result["rulebook_version"] = rulebook_version(settings)
    return result


def _plain_numbers(node):
    """Integral floats become ints (25.0 -> 25), so the JSON reads as JavaScript writes it."""
    if isinstance(node, dict):
        return {key: _plain_numbers(value) for key, value in node.items()}
    if isinstance(node, list):
        return [_plain_numbers(value) for value in node]
    if isinstance(node, float) and node.is_integer():
        return int(node)
    return node


class _Assessment:
    """One run of the rules; collects actions, cautions, referral and unconfirmed rules."""

    def __init__(self, inp: AssessInput, settings: ClinicSettings):
        self.inp = inp
        self.settings = settings
        self.actions: dict[str, dict] = {}
        self.cautions: dict[str, dict] = {}
        self.refer_levels: list[str] = ["none"]
        self.unconfirmed: dict[str, dict] = {}
        self.facility = facility(settings.referral_facility_name,
                                 settings.referral_facility_phone)

    # --- collectors ---------------------------------------------------------------------------
    def act(self, code: str, **params) -> None:
        self._note_text("actions", code)
        self.actions[code] = {"facility": self.facility, **params}

    def caution(self, code: str, **params) -> None:
        self._note_text("cautions", code)
        self.cautions[code] = params

    def refer(self, level: str) -> None:
        self.refer_levels.append(level)

    def used(self, key: str, entry: dict) -> None:
        """Record that a rulebook entry was used; unconfirmed ones get a caution."""
        if entry.get("status") == "unconfirmed":
            self.unconfirmed[key] = entry

    def _note_text(self, kind: str, code: str) -> None:
        self.used(kind + "." + code, text_entry(kind, code))

    # --- the run ------------------------------------------------------------------------------
    def run(self) -> dict:
        inp, age = self.inp, self.inp.age_months
        self.young = classify.is_young_infant(age)
        self.severity = classify.severity(dict(inp.signs), age)
        self.dangers = classify.danger_signs(inp)
        self.wflh_z = self._wflh_z()
        self.nutrition = classify.malnutrition(inp, self.wflh_z)
        self.sam = self.nutrition == "sam"
        self.plan = "SAM" if self.sam else PLAN_BY_SEVERITY[self.severity]
        self.weight = self._weight()
        out = {"severity": self.severity, "plan": self.plan, "ors": None, "per_stool_ml": None,
               "iv": None, "ng": None, "sam_rehydration": None}
        out["home_ors_ml_per_day"] = (RULES["sam_rehydration"]["home_ors_ml_per_day"] if self.sam
                                      else plans.plan_a(age)["home_ors_ml_per_day"])
        self._always()
        self._danger()
        plan_steps = {"A": self._plan_a, "B": self._plan_b, "C": self._plan_c, "SAM": self._plan_sam}
        plan_steps[self.plan](out)
        out["zinc"] = self._zinc()
        self._other_classifications()
        out["maintenance"] = self._maintenance()
        out["free_water_deficit"] = self._free_water()
        self._weight_cautions()
        out["classifications"] = self._classifications()
        out["refer"] = max(self.refer_levels, key=RULES["refer_levels"]["order"].index)
        out["actions"] = ordered("actions", self.actions)
        out["cautions"] = ordered("cautions", self.cautions) + self._unconfirmed_cautions()
        out["scores"] = scores.compute_scores(inp.raw, age)
        out["weight"] = self.weight
        out["anthropometry"] = {"wflh_z": self.wflh_z, "muac_mm": inp.muac_mm,
                                "oedema_both_feet": inp.oedema_both_feet}
        out["danger_signs"] = self.dangers
        out["context"] = {name: getattr(self.settings, name) for name in (
            "plan_b_table", "iv_available", "ng_trained", "minutes_to_iv_facility",
            "cholera_outbreak", "cholera_in_area")}
        return out

    def _wflh_z(self) -> float | None:
        # An estimated weight never feeds the SAM criteria.
        inp = self.inp
        if inp.weight_kg is None or inp.weight_estimated or inp.height_cm is None:
            return None
        return growth.wflh_z(inp.sex, growth.age_days(inp.age_months), inp.weight_kg,
                             inp.height_cm, inp.height_measured_lying)

    def _weight(self) -> dict | None:
        """The entered weight, for every weight-based step (never an estimate in SAM)."""
        inp = self.inp
        if inp.weight_kg is None or (self.sam and inp.weight_estimated):
            return None
        basis = "entered_estimate" if inp.weight_estimated else "measured"
        return {"kg": inp.weight_kg, "estimated": inp.weight_estimated, "basis": basis}

    def _weight_from_age(self) -> dict | None:
        """Plan C volumes without a weight: the age formula, always labelled estimated.

        Not for Plan B (its table has an age column) and never in SAM (Plan C only).
        """
        inp = self.inp
        method = RULES["weight_estimate_method"]["value"]
        kg = fluids.weight_from_age(inp.age_months, method)
        if kg is None:
            return None
        row = fluids.weight_from_age_row(inp.age_months, method)
        self.used("weight_from_age.methods." + method, row)
        return {"kg": kg, "estimated": True, "basis": method, "formula": row["formula"]}

    def _kg(self) -> float | None:
        return None if self.weight is None else self.weight["kg"]

    def _always(self) -> None:
        self.caution("decision_support")
        self.caution("vomiting", minutes=RULES["vomiting_wait_minutes"]["value"])
        self.caution("puffy_eyelids")
        self.caution("not_improving")

    def _danger(self) -> None:
        if not self.dangers:
            return
        self.refer("urgent")
        self.act("refer_urgent_danger")
        # Plan C's own steps already say how to travel (drip, tube, or sips on the way).
        if self.plan == "B":
            self.act("sips_on_the_way")

    # --- plans --------------------------------------------------------------------------------
    def _plan_a(self, out: dict) -> None:
        out["per_stool_ml"] = plans.per_stool(self.inp.age_months)
        home = out["home_ors_ml_per_day"]
        if out["per_stool_ml"].get("as_much_as_wanted"):
            self.act("plan_a_fluid_any", home_ml=home)
        else:
            self.act("plan_a_fluid", home_ml=home, **out["per_stool_ml"])
        self.act("plan_a_home_rules")

    def _plan_b(self, out: dict) -> None:
        inp = self.inp
        ors = plans.plan_b(inp.age_months, inp.weight_kg, self.settings.plan_b_table)
        ors["weight_estimated"] = inp.weight_kg is not None and inp.weight_estimated
        out["ors"] = ors
        params = {"hours": ors["hours"], "ml_per_kg": ors["ml_per_kg"],
                  "table": ors["table_label"], "low_ml": ors["low_ml"], "high_ml": ors["high_ml"],
                  "total_ml": ors["total_ml"]}
        no_row = ors["low_ml"] is None
        if ors["total_ml"] is not None:
            self.act("plan_b_weight_no_row" if no_row else "plan_b_weight_row", **params)
        else:
            self.act("plan_b_no_volume" if no_row else "plan_b_age_row", **params)
        if no_row:
            self.caution("plan_b_no_table_row", table=ors["table_label"],
                         ml_per_kg=ors["ml_per_kg"])
        elif ors["total_ml"] is not None and ors["total_ml"] > ors["high_ml"]:
            self.caution("plan_b_above_table", ml_per_kg=ors["ml_per_kg"])
        self.act("plan_b_how")
        if not self.dangers:
            self.act("plan_b_reassess", hours=ors["hours"])

    def _plan_c(self, out: dict) -> None:
        route = plans.plan_c_route(self.settings)
        if self.weight is None and route in ("iv", "ng"):
            self.weight = self._weight_from_age()
        kg = self._kg()
        if route == "iv":
            iv = plans.plan_c_iv(self.inp.age_months, kg)
            out["iv"] = iv
            first, second = iv["steps"]
            self.act("plan_c_iv_per_kg" if kg is None else "plan_c_iv", fluid=iv["fluid"],
                     step1_ml=first["ml"], step1_ml_per_kg=first["ml_per_kg"],
                     step1_minutes=first["minutes"], step2_ml=second["ml"],
                     step2_ml_per_kg=second["ml_per_kg"], step2_minutes=second["minutes"])
            reassess = RULES["plan_c_reassess_minutes"]
            self.act("plan_c_iv_monitor", reassess_low=reassess["low"],
                     reassess_high=reassess["high"])
            self.act("plan_c_reassess", hours=iv["reassess_after_hours"])
        elif route == "ng":
            ng = plans.plan_c_ng(kg)
            out["ng"] = ng
            self.act("plan_c_ng_per_kg" if kg is None else "plan_c_ng", **ng)
            self.act("plan_c_ng_monitor")
            self.act("plan_c_reassess", hours=ng["hours"])
        else:
            self.refer("urgent")
            self.act("plan_c_" + route)
        if kg is None and route in ("iv", "ng"):
            self.caution("no_weight")

    def _plan_sam(self, out: dict) -> None:
        kg = self._kg()
        self.refer("urgent")
        self.act("sam_refer")
        sam = plans.sam_rehydration(kg)
        out["sam_rehydration"] = sam
        params = {"first_ml": sam["first_2h_ml_every_30_min"],
                  "then_low_ml": sam["then_ml_per_hour_low"],
                  "then_high_ml": sam["then_ml_per_hour_high"],
                  "first_ml_per_kg": sam["first_ml_per_kg"],
                  "then_low_ml_per_kg": sam["then_ml_per_kg_per_hour_low"],
                  "then_high_ml_per_kg": sam["then_ml_per_kg_per_hour_high"],
                  "interval": sam["interval_minutes"], "first_hours": sam["first_hours"],
                  "max_hours": sam["max_hours"]}
        self.act("sam_resomal_per_kg" if kg is None else "sam_resomal", **params)
        self.act("sam_fluid_note")
        if "shock" in self.inp.danger_signs:
            iv = plans.sam_shock_iv(kg)
            out["iv"] = iv
            step = iv["steps"][0]
            self.act("sam_shock_iv_per_kg" if kg is None else "sam_shock_iv", fluid=iv["fluid"],
                     ml=step["ml"], ml_per_kg=step["ml_per_kg"], minutes=step["minutes"])
        self.caution("sam_signs_unreliable")
        if kg is None:
            self.caution("sam_no_estimated_weight")

    # --- the rest -----------------------------------------------------------------------------
    def _zinc(self) -> dict | None:
        age = self.inp.age_months
        floor = RULES["zinc_min_age_months"]
        if age < floor["value"]:
            self.used("zinc_min_age_months", floor)
        zinc = plans.zinc(age, self.settings)
        if zinc is not None:
            same = zinc["days_min"] == zinc["days_max"]
            self.act("zinc_fixed_days" if same else "zinc", mg=zinc["mg_per_day"],
                     days_min=zinc["days_min"], days_max=zinc["days_max"])
        return zinc

    def _other_classifications(self) -> None:
        inp, dehydrated = self.inp, self.severity != "none"
        self.persistent = classify.is_persistent(inp)
        if self.persistent and dehydrated:
            self.refer("routine")
            self.act("severe_persistent_refer")
        elif self.persistent:
            self.act("persistent_feeding")
        if inp.blood_in_stool and (self.young or self.sam):
            self.refer("urgent")
            self.act("dysentery_refer")
        elif inp.blood_in_stool:
            self.act("dysentery_policy", policy_text=self.settings.dysentery_policy_text)
        if self.young:
            self._young_infant(dehydrated)
        outbreak = self.settings.cholera_outbreak
        self.cholera = classify.suspected_cholera(inp, outbreak)
        if self.cholera:
            self.act("cholera_report")
            in_area = self.settings.cholera_in_area or outbreak
            if (in_area and self.severity == "severe"
                    and inp.age_months >= RULES["cholera_antibiotic"]["min_age_months"]):
                self.act("cholera_antibiotic")
        if self.nutrition == "mam":
            self.act("mam_feeding")
        if inp.oedema_both_feet and not classify.in_malnutrition_ages(inp.age_months):
            self.caution("oedema_outside_sam_ages")
        limit = RULES["hypernatraemia"]["refer_above_mmol_l"]
        if inp.sodium_mmol_l is not None and inp.sodium_mmol_l > limit:
            self.refer("routine")
            fall = RULES["sodium_max_fall_mmol_l_per_day"]
            self.act("hypernatraemia_refer", limit=limit, fall_low=fall["min"],
                     fall_high=fall["max"])

    def _young_infant(self, dehydrated: bool) -> None:
        rule = RULES["young_infant_referral"]
        self.used("young_infant_signs", RULES["young_infant_signs"])
        self.used("young_infant_referral", rule)
        if dehydrated or self.persistent or self.inp.blood_in_stool or self.dangers:
            self.refer("urgent")
            self.act("young_infant_refer_urgent")
        else:
            self.refer(rule["otherwise"])
            self.act("young_infant_refer_routine")

    def _maintenance(self) -> dict | None:
        kg = self._kg()
        if kg is None:
            return None
        above_20 = self.settings.maintenance_above_20kg_ml_per_kg
        variant = RULES["maintenance_above_20kg_variant_ml_per_kg"]
        if above_20 == variant["value"] and kg > RULES["maintenance_holliday_segar"]["band_upper_kg"][-1]:
            self.used("maintenance_above_20kg_variant_ml_per_kg", variant)
        return {"daily_ml": round_volume(fluids.maintenance_daily_ml(kg, above_20)),
                "hourly_421_ml": round_volume(fluids.maintenance_hourly_421_ml(kg)),
                "above_20kg_ml_per_kg": above_20, "weight_estimated": self.weight["estimated"],
                "source": RULES["maintenance_holliday_segar"]["source"]}

    def _free_water(self) -> dict | None:
        inp, kg = self.inp, self._kg()
        if inp.sodium_mmol_l is None or kg is None:
            return None
        litres = fluids.free_water_deficit_l(kg, inp.sodium_mmol_l, inp.sex, inp.age_months)
        if litres is None or litres <= 0:
            return None
        self.used("total_body_water_fraction.row", fluids.total_body_water_row(inp.age_months))
        ml = round_volume(litres * RULES["ml_per_litre"]["value"])
        self.caution("free_water_deficit", ml=ml, sodium=inp.sodium_mmol_l)
        return {"ml": ml, "sodium_mmol_l": inp.sodium_mmol_l, "info_only": True,
                "weight_estimated": self.weight["estimated"],
                "source": RULES["free_water_deficit"]["source"]}

    def _weight_cautions(self) -> None:
        inp, weight = self.inp, self.weight
        if weight is not None and weight["basis"] not in ("measured", "entered_estimate"):
            self.caution("weight_from_age", weight_kg=weight["kg"])
        if inp.weight_kg is not None and inp.weight_estimated:
            self.caution("weight_entered_estimated")
        if inp.confirm_implausible_weight and inp.weight_kg is not None and weight_is_implausible(
                inp.sex, inp.age_months, inp.weight_kg):
            self.caution("implausible_weight_confirmed")

    def _classifications(self) -> list[str]:
        found = {SEVERITY_CODES[self.severity]}
        dehydrated = self.severity != "none"
        flags = {
            "very_severe_disease": bool(self.dangers),
            "young_infant": self.young,
            "severe_acute_malnutrition": self.sam,
            "moderate_acute_malnutrition": self.nutrition == "mam",
            "severe_persistent_diarrhoea": self.persistent and dehydrated,
            "persistent_diarrhoea": self.persistent and not dehydrated,
            "dysentery": self.inp.blood_in_stool,
            "suspected_cholera": self.cholera,
        }
        found.update(code for code, on in flags.items() if on)
        return [code for code in RULES["classification_order"]["order"] if code in found]

    def _unconfirmed_cautions(self) -> list[dict]:
        template = text_entry("cautions", "unconfirmed_rule")
        out = []
        for key in sorted(self.unconfirmed):
            entry = self.unconfirmed[key]
            label = entry.get("label") or entry.get("note") or key
            source = entry.get("source") or "PRACTICE"
            out.append({"code": "unconfirmed_rule", "rule": key,
                        "text": render(template["text"], {"source": source, "label": label})})
        return out
