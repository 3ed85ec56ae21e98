// WHO Child Growth Standards z-scores: the JavaScript twin of clinic_app/clinical/growth.py.
// Same steps in the same order (see that module's docstring); tables and constants come from
// the rulebook JSON (rulebook.growth_tables and rules.growth_*).
import { HALF } from './text.js';

export const SEXES = ['female', 'male'];

function roundHalfUp(x) {
  const whole = Math.floor(x);
  return x - whole >= HALF ? whole + 1 : whole;
}

export function ageDays(rules, ageMonths) {
  return roundHalfUp(ageMonths * rules.growth_days_per_month.value);
}

function roundZ(z) {
  return Math.floor(z * 100 + HALF) / 100;
}

// SD23 rule: beyond |z| = k (3) the distance between SD(k - 1) and SD(k) is the unit.
function lmsZ(rules, y, lms) {
  const [l, m, s] = lms;
  const k = rules.growth_sd23_rule.value;
  let z = (Math.pow(y / m, l) - 1) / (s * l);
  if (z > k) {
    const sd3 = m * Math.pow(1 + l * s * k, 1 / l);
    const sd2 = m * Math.pow(1 + l * s * (k - 1), 1 / l);
    z = k + (y - sd3) / (sd3 - sd2);
  } else if (z < -k) {
    const sd3 = m * Math.pow(1 + l * s * -k, 1 / l);
    const sd2 = m * Math.pow(1 + l * s * -(k - 1), 1 / l);
    z = -k + (y - sd3) / (sd2 - sd3);
  }
  return z;
}

function valueAtZ(rules, z, lms) {
  const [l, m, s] = lms;
  const k = rules.growth_sd23_rule.value;
  const sd = (q) => m * Math.pow(1 + l * s * q, 1 / l);
  if (z > k) return sd(k) + (z - k) * (sd(k) - sd(k - 1));
  if (z < -k) return sd(-k) + (z + k) * (sd(-(k - 1)) - sd(-k));
  return sd(z);
}

function lmsAtLength(table, rows, x) {
  const t = Math.trunc(x * 10);
  const diff = (x - t / 10) / table.step;
  const i = t - Math.round(table.start * 10);
  if (diff > 0) {
    const low = rows[i];
    const upp = rows[i + 1];
    return [0, 1, 2].map((j) => low[j] + diff * (upp[j] - low[j]));
  }
  return rows[i];
}

// Weight-for-length/height z (2 dp) or null, as growth.wflh(...)["z"] without age_months.
export function wflhZ(rulebook, sex, days, weightKg, heightCm, measuredLying) {
  const rules = rulebook.rules;
  const conv = rules.growth_length_height_conversion_cm.value;
  const table = days < rules.growth_height_table_from_age_days.value ? 'wfl' : 'wfh';
  const months = days / rules.growth_days_per_month.value;
  let lying = measuredLying;
  if (lying === false && months < rules.growth_standing_min_age_months.value) lying = null;
  let x = heightCm;
  if (x !== null && table === 'wfl' && lying === false) x = x + conv;
  else if (x !== null && table === 'wfh' && lying === true) x = x - conv;
  const limits = rules[`growth_${table}_range_cm`];
  if (!SEXES.includes(sex) || weightKg === null || weightKg <= 0 || x === null
      || days < 0 || days > rules.growth_max_age_days.value
      || !(limits.min <= x && x <= limits.max)) {
    return null;
  }
  const data = rulebook.growth_tables[table];
  return roundZ(lmsZ(rules, weightKg, lmsAtLength(data, data[sex], x)));
}

function wfaLms(rulebook, sex, days) {
  if (!SEXES.includes(sex) || days < 0 || days > rulebook.rules.growth_max_age_days.value) {
    return null;
  }
  const rows = rulebook.growth_tables.wfa[sex];
  return days < rows.length ? rows[days] : null;
}

function wfaZ(rulebook, sex, days, weightKg) {
  const lms = wfaLms(rulebook, sex, days);
  if (lms === null || weightKg === null || weightKg <= 0) return null;
  return roundZ(lmsZ(rulebook.rules, weightKg, lms));
}

// false when the WAZ is below -6 or above +5 (WHO flag); null when it cannot be judged.
export function weightPlausible(rulebook, sex, ageMonths, weightKg) {
  const z = wfaZ(rulebook, sex, ageDays(rulebook.rules, ageMonths), weightKg);
  if (z === null) return null;
  const flag = rulebook.rules.growth_waz_implausible;
  return flag.below <= z && z <= flag.above;
}

export function plausibleWeightRangeKg(rulebook, sex, ageMonths) {
  const lms = wfaLms(rulebook, sex, ageDays(rulebook.rules, ageMonths));
  if (lms === null) return null;
  const flag = rulebook.rules.growth_waz_implausible;
  return [valueAtZ(rulebook.rules, flag.below, lms), valueAtZ(rulebook.rules, flag.above, lms)];
}
