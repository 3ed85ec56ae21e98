// Input validation: the JavaScript twin of clinic_app/clinical/validate.py, an interpreter of
// rules.input_fields with one message per bad field (keyed by path, e.g. "signs.eyes").
import { plausibleWeightRangeKg, SEXES, weightPlausible } from './growth.js';
import { scoreItemErrors } from './scores.js';
import { fmt, isObject, own, render, setOwn, sortedKeys } from './text.js';

// Thrown inside the engine and turned into the 422 body by assess(); not an Error, as a stack
// trace is costly and never shown.
export class InputError {
  constructor(code, fields) {
    this.code = code;
    this.fields = fields;
  }
}

const SCALAR_FIELDS = ['weight_kg', 'weight_estimated', 'sex', 'height_cm',
  'height_measured_lying', 'muac_mm', 'oedema_both_feet', 'diarrhoea_days', 'blood_in_stool',
  'sodium_mmol_l', 'confirm_implausible_weight'];
const DEFAULTS = { weight_kg: null, weight_estimated: false, sex: null, height_cm: null,
  height_measured_lying: null, muac_mm: null, oedema_both_feet: false, diarrhoea_days: null,
  blood_in_stool: false, sodium_mmol_l: null, confirm_implausible_weight: false };

function message(rules, key, spec, params = {}) {
  const unit = spec.unit;
  return render(rules.input_messages.texts[key],
    { label: spec.label, unit: unit ? ` ${unit}` : '', ...params });
}

function isNumber(value) {
  return typeof value === 'number' && Number.isFinite(value);
}

function typeError(rules, spec, value) {
  const kind = spec.type;
  if (kind === 'number' && !isNumber(value)) return message(rules, 'number', spec);
  if (kind === 'integer' && !(isNumber(value) && Number.isInteger(value))) {
    return message(rules, 'integer', spec);
  }
  if (kind === 'boolean' && typeof value !== 'boolean') return message(rules, 'boolean', spec);
  if (kind === 'choice' && !spec.choices.includes(value)) {
    return message(rules, 'choice', spec, { choices: spec.choices.join(', ') });
  }
  if (kind === 'object' && !isObject(value)) return message(rules, 'object', spec);
  return null;
}

function opt(spec, key) {
  return own(spec, key) ? spec[key] : null;
}

function rangeError(rules, spec, value) {
  const low = opt(spec, 'min');
  const high = opt(spec, 'max');
  const highExcl = opt(spec, 'max_exclusive');
  const tooLow = low !== null && value < low;
  if (highExcl !== null && (tooLow || value >= highExcl)) {
    return message(rules, 'range_exclusive', spec, { min: low, max: highExcl });
  }
  if (high !== null && (tooLow || value > high)) {
    return message(rules, 'range', spec, { min: low, max: high });
  }
  if (high === null && highExcl === null && tooLow) return message(rules, 'min', spec, { min: low });
  return null;
}

function unknownKeys(rules, data, specs, allowed, prefix, errors) {
  const known = new Set(specs.map((spec) => spec.name));
  const unknown = Object.keys(data).filter((key) => !known.has(key) && !allowed.includes(key));
  for (const key of sortedKeys(unknown)) {
    setOwn(errors, prefix + key, rules.input_messages.texts.unknown);
  }
}

function checkFields(rules, specs, data, prefix, age, errors, out) {
  for (const spec of specs) {
    const path = prefix + spec.name;
    const value = own(data, spec.name) ? data[spec.name] : null;
    if (value === null) {
      const neededFrom = opt(spec, 'required_from_age_months');
      if (spec.required || (neededFrom !== null && age !== null && age >= neededFrom)) {
        setOwn(errors, path, message(rules, 'required', spec));
      }
      continue;
    }
    let problem = typeError(rules, spec, value);
    if (problem === null && (spec.type === 'number' || spec.type === 'integer')) {
      problem = rangeError(rules, spec, value);
    }
    if (problem !== null) {
      setOwn(errors, path, problem);
    } else if (spec.type === 'object') {
      out[spec.name] = {};
      unknownKeys(rules, value, spec.fields, [], `${path}.`, errors);
      checkFields(rules, spec.fields, value, `${path}.`, age, errors, out[spec.name]);
    } else {
      out[spec.name] = value;
    }
  }
}

function validAge(rules, input) {
  const age = own(input, 'age_months') ? input.age_months : null;
  const spec = rules.input_fields.fields[0];
  if (isNumber(age) && rangeError(rules, spec, age) === null) return age;
  return null;
}

// The validated input (absent optional values null, booleans false); throws InputError.
export function validate(rules, input) {
  if (!isObject(input)) {
    throw new InputError('invalid_input', { body: rules.input_messages.texts.not_object });
  }
  const specs = rules.input_fields.fields;
  const errors = {};
  const out = {};
  const age = validAge(rules, input);
  unknownKeys(rules, input, specs, ['score_items'], '', errors);
  checkFields(rules, specs, input, '', age, errors, out);
  for (const [key, text] of Object.entries(scoreItemErrors(rules, input))) setOwn(errors, key, text);
  if (Object.keys(errors).length) throw new InputError('invalid_input', errors);
  const signs = { ...out.signs };
  if (age < rules.young_infant_signs.max_age_months_exclusive) delete signs.drinking;
  const danger = out.danger_signs || {};
  const inp = { age_months: out.age_months, signs,
    danger_signs: rules.danger_signs.inputs.filter((name) => danger[name] === true),
    context: out.context || {}, raw: input };
  for (const name of SCALAR_FIELDS) inp[name] = own(out, name) ? out[name] : DEFAULTS[name];
  return inp;
}

function broadBand(rules, ageMonths) {
  for (const row of rules.implausible_weight_broad_bands.rows) {
    if (row.max_age_months === null || ageMonths < row.max_age_months) return row;
  }
  throw new Error('the last broad band is open-ended');
}

export function weightIsImplausible(rulebook, sex, ageMonths, weightKg) {
  const sexes = sex !== null ? [sex] : SEXES;
  const verdicts = sexes.map((s) => weightPlausible(rulebook, s, ageMonths, weightKg));
  if (verdicts.every((v) => v === null)) {
    const band = broadBand(rulebook.rules, ageMonths);
    return !(band.min_kg <= weightKg && weightKg <= band.max_kg);
  }
  return !verdicts.some((v) => v !== false);
}

function plausibleBounds(rulebook, sex, ageMonths) {
  const bounds = plausibleWeightRangeKg(rulebook, sex || SEXES[0], ageMonths);
  if (bounds === null) {
    const band = broadBand(rulebook.rules, ageMonths);
    return [band.min_kg, band.max_kg];
  }
  if (sex === null) return null;
  return [Math.floor(bounds[0]), Math.ceil(bounds[1])];
}

// Throws InputError("implausible_weight") unless the user confirmed the weight.
export function checkWeightPlausible(rulebook, inp) {
  if (inp.weight_kg === null || inp.confirm_implausible_weight) return;
  if (!weightIsImplausible(rulebook, inp.sex, inp.age_months, inp.weight_kg)) return;
  const bounds = plausibleBounds(rulebook, inp.sex, inp.age_months);
  const texts = rulebook.rules.input_messages.texts;
  const shown = bounds === null ? ''
    : render(texts.implausible_range, { low_kg: bounds[0], high_kg: bounds[1] });
  throw new InputError('implausible_weight', { weight_kg: render(texts.implausible_weight,
    { weight_kg: fmt(inp.weight_kg), range: shown }) });
}
