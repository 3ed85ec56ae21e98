// The offline assessment engine: assess(input, rulebook) returns the same JSON as
// POST /api/v1/assess (clinic_app/clinical/assess.py), step for step. No DOM, no clinical
// numbers: everything comes from the rulebook JSON (GET /api/v1/rulebook).
//
// Bad input does not throw: the result is the 422 body {"error": {"code", "fields"}}.
import * as classify from './engine/classify.js';
import * as fluids from './engine/fluids.js';
import * as growth from './engine/growth.js';
import * as plans from './engine/plans.js';
import { computeScores } from './engine/scores.js';
import {
  facility, ordered, replaceAll, roundVolume, sortedKeys,
} from './engine/text.js';
import {
  checkWeightPlausible, InputError, validate, weightIsImplausible,
} from './engine/validate.js';

const PLAN_BY_SEVERITY = { none: 'A', some: 'B', severe: 'C' };
const CONTEXT_FIELDS = ['plan_b_table', 'iv_available', 'ng_trained', 'minutes_to_iv_facility',
  'cholera_outbreak', 'cholera_in_area'];

class Assessment {
  constructor(rulebook, inp, settings) {
    this.rulebook = rulebook;
    this.rules = rulebook.rules;
    this.inp = inp;
    this.settings = settings;
    this.actions = new Map();
    this.cautions = new Map();
    this.referLevels = ['none'];
    this.unconfirmed = new Map();
    this.facility = facility(this.rules, settings.referral_facility_name,
      settings.referral_facility_phone);
  }

  act(code, params = {}) {
    this.noteText('actions', code);
    this.actions.set(code, { facility: this.facility, ...params });
  }

  caution(code, params = {}) {
    this.noteText('cautions', code);
    this.cautions.set(code, params);
  }

  refer(level) {
    this.referLevels.push(level);
  }

  used(key, entry) {
    if (entry.status === 'unconfirmed') this.unconfirmed.set(key, entry);
  }

  noteText(kind, code) {
    this.used(`${kind}.${code}`, this.rules[kind].texts[code]);
  }

  run() {
    const { inp, rules } = this;
    const age = inp.age_months;
    this.young = classify.isYoungInfant(rules, age);
    this.severity = classify.severity(rules, inp.signs, age);
    this.dangers = classify.dangerSigns(rules, inp);
    this.wflhZ = this.computeWflhZ();
    this.nutrition = classify.malnutrition(rules, inp, this.wflhZ);
    this.sam = this.nutrition === 'sam';
    this.plan = this.sam ? 'SAM' : PLAN_BY_SEVERITY[this.severity];
    this.weight = this.computeWeight();
    const out = { severity: this.severity, plan: this.plan, ors: null, per_stool_ml: null,
      iv: null, ng: null, sam_rehydration: null };
    out.home_ors_ml_per_day = this.sam ? rules.sam_rehydration.home_ors_ml_per_day
      : plans.planA(rules, age).home_ors_ml_per_day;
    this.always();
    this.danger();
    this[`plan${this.plan}`](out);
    out.zinc = this.zinc();
    this.otherClassifications();
    out.maintenance = this.maintenance();
    out.free_water_deficit = this.freeWater();
    this.weightCautions();
    out.classifications = this.classifications();
    const levels = rules.refer_levels.order;
    out.refer = this.referLevels.reduce(
      (best, level) => (levels.indexOf(level) > levels.indexOf(best) ? level : best));
    out.actions = ordered(rules, 'actions', this.actions);
    out.cautions = ordered(rules, 'cautions', this.cautions).concat(this.unconfirmedCautions());
    out.scores = computeScores(rules, inp.raw, age);
    out.weight = this.weight;
    out.anthropometry = { wflh_z: this.wflhZ, muac_mm: inp.muac_mm,
      oedema_both_feet: inp.oedema_both_feet };
    out.danger_signs = this.dangers;
    out.context = {};
    for (const name of CONTEXT_FIELDS) out.context[name] = this.settings[name];
    return out;
  }

  computeWflhZ() {
    // An estimated weight never feeds the SAM criteria.
    const { inp } = this;
    if (inp.weight_kg === null || inp.weight_estimated || inp.height_cm === null) return null;
    return growth.wflhZ(this.rulebook, inp.sex, growth.ageDays(this.rules, inp.age_months),
      inp.weight_kg, inp.height_cm, inp.height_measured_lying);
  }

  // The entered weight, for every weight-based step (never an estimate in SAM).
  computeWeight() {
    const { inp } = this;
    if (inp.weight_kg === null || (this.sam && inp.weight_estimated)) return null;
    const basis = inp.weight_estimated ? 'entered_estimate' : 'measured';
    return { kg: inp.weight_kg, estimated: inp.weight_estimated, basis };
  }

  // Plan C volumes without a weight: the age formula, always labelled estimated.
  weightFromAge() {
    const { inp, rules } = this;
    const method = rules.weight_estimate_method.value;
    const kg = fluids.weightFromAge(rules, inp.age_months, method);
    if (kg === null) return null;
    const row = fluids.weightFromAgeRow(rules, inp.age_months, method);
    this.used(`weight_from_age.methods.${method}`, row);
    return { kg, estimated: true, basis: method, formula: row.formula };
  }

  kg() {
    return this.weight === null ? null : this.weight.kg;
  }

  always() {
    this.caution('decision_support');
    this.caution('vomiting', { minutes: this.rules.vomiting_wait_minutes.value });
    this.caution('puffy_eyelids');
    this.caution('not_improving');
  }

  danger() {
    if (!this.dangers.length) return;
    this.refer('urgent');
    this.act('refer_urgent_danger');
    // Plan C's own steps already say how to travel (drip, tube, or sips on the way).
    if (this.plan === 'B') this.act('sips_on_the_way');
  }

  planA(out) {
    out.per_stool_ml = plans.perStool(this.rules, this.inp.age_months);
    const home = out.home_ors_ml_per_day;
    if (out.per_stool_ml.as_much_as_wanted) {
      this.act('plan_a_fluid_any', { home_ml: home });
    } else {
      this.act('plan_a_fluid', { home_ml: home, ...out.per_stool_ml });
    }
    this.act('plan_a_home_rules');
  }

  planB(out) {
    const { inp } = this;
    const ors = plans.planB(this.rules, inp.age_months, inp.weight_kg, this.settings.plan_b_table);
    ors.weight_estimated = inp.weight_kg !== null && inp.weight_estimated;
    out.ors = ors;
    const params = { hours: ors.hours, ml_per_kg: ors.ml_per_kg, table: ors.table_label,
      low_ml: ors.low_ml, high_ml: ors.high_ml, total_ml: ors.total_ml };
    const noRow = ors.low_ml === null;
    if (ors.total_ml !== null) {
      this.act(noRow ? 'plan_b_weight_no_row' : 'plan_b_weight_row', params);
    } else {
      this.act(noRow ? 'plan_b_no_volume' : 'plan_b_age_row', params);
    }
    if (noRow) {
      this.caution('plan_b_no_table_row', { table: ors.table_label, ml_per_kg: ors.ml_per_kg });
    } else if (ors.total_ml !== null && ors.total_ml > ors.high_ml) {
      this.caution('plan_b_above_table', { ml_per_kg: ors.ml_per_kg });
    }
    this.act('plan_b_how');
    if (!this.dangers.length) this.act('plan_b_reassess', { hours: ors.hours });
  }

  planC(out) {
    const route = plans.planCRoute(this.rules, this.settings);
    if (this.weight === null && (route === 'iv' || route === 'ng')) this.weight = this.weightFromAge();
    const kg = this.kg();
    if (route === 'iv') {
      const iv = plans.planCIv(this.rules, this.inp.age_months, kg);
      out.iv = iv;
      const [first, second] = iv.steps;
      this.act(kg === null ? 'plan_c_iv_per_kg' : 'plan_c_iv', { fluid: iv.fluid,
        step1_ml: first.ml, step1_ml_per_kg: first.ml_per_kg, step1_minutes: first.minutes,
        step2_ml: second.ml, step2_ml_per_kg: second.ml_per_kg, step2_minutes: second.minutes });
      const reassess = this.rules.plan_c_reassess_minutes;
      this.act('plan_c_iv_monitor', { reassess_low: reassess.low, reassess_high: reassess.high });
      this.act('plan_c_reassess', { hours: iv.reassess_after_hours });
    } else if (route === 'ng') {
      const ng = plans.planCNg(this.rules, kg);
      out.ng = ng;
      this.act(kg === null ? 'plan_c_ng_per_kg' : 'plan_c_ng', ng);
      this.act('plan_c_ng_monitor');
      this.act('plan_c_reassess', { hours: ng.hours });
    } else {
      this.refer('urgent');
      this.act(`plan_c_${route}`);
    }
    if (kg === null && (route === 'iv' || route === 'ng')) this.caution('no_weight');
  }

  planSAM(out) {
    const kg = this.kg();
    this.refer('urgent');
    this.act('sam_refer');
    const sam = plans.samRehydration(this.rules, kg);
    out.sam_rehydration = sam;
    this.act(kg === null ? 'sam_resomal_per_kg' : 'sam_resomal', {
      first_ml: sam.first_2h_ml_every_30_min, then_low_ml: sam.then_ml_per_hour_low,
      then_high_ml: sam.then_ml_per_hour_high, first_ml_per_kg: sam.first_ml_per_kg,
      then_low_ml_per_kg: sam.then_ml_per_kg_per_hour_low,
      then_high_ml_per_kg: sam.then_ml_per_kg_per_hour_high, interval: sam.interval_minutes,
      first_hours: sam.first_hours, max_hours: sam.max_hours });
    this.act('sam_fluid_note');
    if (this.inp.danger_signs.includes('shock')) {
      const iv = plans.samShockIv(this.rules, kg);
      out.iv = iv;
      const step = iv.steps[0];
      this.act(kg === null ? 'sam_shock_iv_per_kg' : 'sam_shock_iv', { fluid: iv.fluid,
        ml: step.ml, ml_per_kg: step.ml_per_kg, minutes: step.minutes });
    }
    this.caution('sam_signs_unreliable');
    if (kg === null) this.caution('sam_no_estimated_weight');
  }

  zinc() {
    const age = this.inp.age_months;
    const floor = this.rules.zinc_min_age_months;
    if (age < floor.value) this.used('zinc_min_age_months', floor);
    const zinc = plans.zinc(this.rules, age, this.settings);
    if (zinc !== null) {
      const same = zinc.days_min === zinc.days_max;
      this.act(same ? 'zinc_fixed_days' : 'zinc', { mg: zinc.mg_per_day,
        days_min: zinc.days_min, days_max: zinc.days_max });
    }
    return zinc;
  }

  otherClassifications() {
    const { inp, rules, settings } = this;
    const dehydrated = this.severity !== 'none';
    this.persistent = classify.isPersistent(rules, inp);
    if (this.persistent && dehydrated) {
      this.refer('routine');
      this.act('severe_persistent_refer');
    } else if (this.persistent) {
      this.act('persistent_feeding');
    }
    if (inp.blood_in_stool && (this.young || this.sam)) {
      this.refer('urgent');
      this.act('dysentery_refer');
    } else if (inp.blood_in_stool) {
      this.act('dysentery_policy', { policy_text: settings.dysentery_policy_text });
    }
    if (this.young) this.youngInfant(dehydrated);
    const outbreak = settings.cholera_outbreak;
    this.cholera = classify.suspectedCholera(rules, inp, outbreak);
    if (this.cholera) {
      this.act('cholera_report');
      const inArea = settings.cholera_in_area || outbreak;
      if (inArea && this.severity === 'severe'
          && inp.age_months >= rules.cholera_antibiotic.min_age_months) {
        this.act('cholera_antibiotic');
      }
    }
    if (this.nutrition === 'mam') this.act('mam_feeding');
    if (inp.oedema_both_feet && !classify.inMalnutritionAges(rules, inp.age_months)) {
      this.caution('oedema_outside_sam_ages');
    }
    const limit = rules.hypernatraemia.refer_above_mmol_l;
    if (inp.sodium_mmol_l !== null && inp.sodium_mmol_l > limit) {
      this.refer('routine');
      const fall = rules.sodium_max_fall_mmol_l_per_day;
      this.act('hypernatraemia_refer', { limit, fall_low: fall.min, fall_high: fall.max });
    }
  }

  youngInfant(dehydrated) {
    const rule = this.rules.young_infant_referral;
    this.used('young_infant_signs', this.rules.young_infant_signs);
    this.used('young_infant_referral', rule);
    if (dehydrated || this.persistent || this.inp.blood_in_stool || this.dangers.length) {
      this.refer('urgent');
      this.act('young_infant_refer_urgent');
    } else {
      this.refer(rule.otherwise);
      this.act('young_infant_refer_routine');
    }
  }

  maintenance() {
    const kg = this.kg();
    if (kg === null) return null;
    const { rules } = this;
    const above20 = this.settings.maintenance_above_20kg_ml_per_kg;
    const variant = rules.maintenance_above_20kg_variant_ml_per_kg;
    const uppers = rules.maintenance_holliday_segar.band_upper_kg;
    if (above20 === variant.value && kg > uppers[uppers.length - 1]) {
      this.used('maintenance_above_20kg_variant_ml_per_kg', variant);
    }
    return {
      daily_ml: roundVolume(rules, fluids.maintenanceDailyMl(rules, kg, above20)),
      hourly_421_ml: roundVolume(rules, fluids.maintenanceHourly421Ml(rules, kg)),
      above_20kg_ml_per_kg: above20,
      weight_estimated: this.weight.estimated,
      source: rules.maintenance_holliday_segar.source,
    };
  }

  freeWater() {
    const { inp, rules } = this;
    const kg = this.kg();
    if (inp.sodium_mmol_l === null || kg === null) return null;
    const litres = fluids.freeWaterDeficitL(rules, kg, inp.sodium_mmol_l, inp.sex, inp.age_months);
    if (litres === null || litres <= 0) return null;
    this.used('total_body_water_fraction.row', fluids.totalBodyWaterRow(rules, inp.age_months));
    const ml = roundVolume(rules, litres * rules.ml_per_litre.value);
    this.caution('free_water_deficit', { ml, sodium: inp.sodium_mmol_l });
    return { ml, sodium_mmol_l: inp.sodium_mmol_l, info_only: true,
      weight_estimated: this.weight.estimated, source: rules.free_water_deficit.source };
  }

  weightCautions() {
    const { inp, weight } = this;
    if (weight !== null && weight.basis !== 'measured' && weight.basis !== 'entered_estimate') {
      this.caution('weight_from_age', { weight_kg: weight.kg });
    }
    if (inp.weight_kg !== null && inp.weight_estimated) this.caution('weight_entered_estimated');
    if (inp.confirm_implausible_weight && inp.weight_kg !== null
        && weightIsImplausible(this.rulebook, inp.sex, inp.age_months, inp.weight_kg)) {
      this.caution('implausible_weight_confirmed');
    }
  }

  classifications() {
    const found = new Set([`${this.severity.replace('none', 'no')}_dehydration`]);
    const dehydrated = this.severity !== 'none';
    const flags = {
      very_severe_disease: this.dangers.length > 0,
      young_infant: this.young,
      severe_acute_malnutrition: this.sam,
      moderate_acute_malnutrition: this.nutrition === 'mam',
      severe_persistent_diarrhoea: this.persistent && dehydrated,
      persistent_diarrhoea: this.persistent && !dehydrated,
      dysentery: this.inp.blood_in_stool,
      suspected_cholera: this.cholera,
    };
    for (const [code, on] of Object.entries(flags)) if (on) found.add(code);
    return this.rules.classification_order.order.filter((code) => found.has(code));
  }

  unconfirmedCautions() {
    const template = this.rules.cautions.texts.unconfirmed_rule.text;
    const keys = sortedKeys(Object.fromEntries(this.unconfirmed));
    return keys.map((key) => {
      const entry = this.unconfirmed.get(key);
      const label = entry.label || entry.note || key;
      const source = entry.source || 'PRACTICE';
      return { code: 'unconfirmed_rule', rule: key,
        text: replaceAll(replaceAll(template, '{source}', source), '{label}', label) };
    });
  }
}

function settingsFor(rulebook, inp) {
  return { ...rulebook.settings, ...inp.context };
}

/**
 * Assess one patient offline. `input` is the POST /api/v1/assess body, `rulebook` the
 * GET /api/v1/rulebook JSON. Returns the 200 body, or {"error": {"code", "fields"}}.
 */
export function assess(input, rulebook) {
  let inp;
  try {
    inp = validate(rulebook.rules, input);
    checkWeightPlausible(rulebook, inp);
  } catch (exc) {
    if (exc instanceof InputError) return { error: { code: exc.code, fields: exc.fields } };
    throw exc;
  }
  const result = new Assessment(rulebook, inp, settingsFor(rulebook, inp)).run();
  result.rulebook_version = rulebook.version;
  return result;
}

