// Fluid helpers: the JavaScript twin of clinic_app/clinical/fluids.py (same operation order).
import { own } from './text.js';

// Calendar, not clinical: the one non-rulebook number besides 0, 1, 2, 10 and 100.
const MONTHS_PER_YEAR = 12;

function banded(rules, weightKg, rates) {
  const uppers = rules.maintenance_holliday_segar.band_upper_kg;
  let total = 0;
  let lower = 0;
  const n = Math.min(uppers.length, rates.length);
  for (let i = 0; i < n; i += 1) {
    if (weightKg <= uppers[i]) return total + rates[i] * (weightKg - lower);
    total = total + rates[i] * (uppers[i] - lower);
    lower = uppers[i];
  }
  return total + rates[rates.length - 1] * (weightKg - lower);
}

export function maintenanceDailyMl(rules, weightKg, above20MlPerKg) {
  const [first, second] = rules.maintenance_holliday_segar.ml_per_kg_per_day;
  return banded(rules, weightKg, [first, second, above20MlPerKg]);
}

export function maintenanceHourly421Ml(rules, weightKg) {
  return banded(rules, weightKg, rules.maintenance_holliday_segar.ml_per_kg_per_hour);
}

export function weightFromAgeRow(rules, ageMonths, method) {
  for (const row of rules.weight_from_age.methods[method].rows) {
    if (row.min_months <= ageMonths && ageMonths < row.below_months) return row;
  }
  return null;
}

export function weightFromAge(rules, ageMonths, method) {
  const row = weightFromAgeRow(rules, ageMonths, method);
  if (row === null) return null;
  const age = row.per === 'month' ? ageMonths : ageMonths / MONTHS_PER_YEAR;
  return row.factor * age + row.add;
}

export function totalBodyWaterRow(rules, ageMonths) {
  for (const row of rules.total_body_water_fraction.rows) {
    if (row.min_months <= ageMonths && (row.below_months === null || ageMonths < row.below_months)) {
      return row;
    }
  }
  throw new Error('age must not be negative');
}

function totalBodyWaterFraction(rules, ageMonths, sex) {
  const row = totalBodyWaterRow(rules, ageMonths);
  if (own(row, 'fraction')) return row.fraction;
  if (sex === 'female' || sex === 'male') return own(row, sex) ? row[sex] : null;
  return null;
}

export function freeWaterDeficitL(rules, weightKg, sodium, sex, ageMonths) {
  const fraction = totalBodyWaterFraction(rules, ageMonths, sex);
  if (fraction === null) return null;
  const normal = rules.free_water_deficit.normal_sodium_mmol_l;
  if (sodium <= normal) return 0;
  return fraction * weightKg * (sodium / normal - 1);
}
