// Treatment plans: the JavaScript twin of clinic_app/clinical/plans.py.
import { roundVolume } from './text.js';

export function rowBelow(rows, key, value) {
  for (const row of rows) {
    if (row[key] === null || value < row[key]) return row;
  }
  return null;
}

function ml(rules, weightKg, mlPerKg) {
  return weightKg === null ? null : roundVolume(rules, mlPerKg * weightKg);
}

export function planA(rules, ageMonths) {
  return rowBelow(rules.plan_a.rows, 'max_age_months', ageMonths);
}

export function perStool(rules, ageMonths) {
  const row = planA(rules, ageMonths);
  if (row.as_much_as_wanted) return { as_much_as_wanted: true };
  return { low_ml: row.per_stool_low_ml, high_ml: row.per_stool_high_ml };
}

function repeat(value, times) {
  return Array.from({ length: times }, () => value);
}

export function planB(rules, ageMonths, weightKg, tableName) {
  const table = rules.plan_b_tables[tableName];
  const hours = rules.plan_b_hours.value;
  const perKg = rules.plan_b_ml_per_kg.value;
  let row;
  let total;
  let hourly;
  if (weightKg !== null) {
    row = rowBelow(table.rows, 'max_weight_kg', weightKg);
    total = roundVolume(rules, perKg * weightKg);
    hourly = repeat(roundVolume(rules, perKg * weightKg / hours), hours);
  } else {
    row = rowBelow(table.rows, 'max_age_months', ageMonths);
    total = null;
    const basis = rules.plan_b_schedule_without_weight.value;
    hourly = row === null ? [] : repeat(roundVolume(rules, row[basis] / hours), hours);
  }
  return {
    total_ml: total,
    low_ml: row === null ? null : row.low_ml,
    high_ml: row === null ? null : row.high_ml,
    hours,
    basis: weightKg === null ? 'age' : 'weight',
    hourly_ml: hourly,
    ml_per_kg: perKg,
    table: tableName,
    table_label: table.label,
  };
}

export function planCRoute(rules, settings) {
  if (settings.iv_available) return 'iv';
  const minutes = settings.minutes_to_iv_facility;
  if (minutes !== null && minutes < rules.plan_c_iv_facility_max_minutes.value) {
    return 'refer_iv_facility';
  }
  if (settings.ng_trained) return 'ng';
  return 'refer';
}

export function planCIv(rules, ageMonths, weightKg) {
  const rule = rules.plan_c_iv;
  const schedule = rowBelow(rule.schedules, 'max_age_months', ageMonths);
  const steps = schedule.steps.map((s) => ({
    ml: ml(rules, weightKg, s.ml_per_kg), ml_per_kg: s.ml_per_kg, minutes: s.minutes,
  }));
  return { fluid: rule.fluid, steps, reassess_after_hours: schedule.reassess_after_hours };
}

export function planCNg(rules, weightKg) {
  const rule = rules.plan_c_ng;
  const perHour = rule.ml_per_kg_per_hour;
  const { hours } = rule;
  return {
    ml_per_hour: ml(rules, weightKg, perHour),
    hours,
    total_ml: ml(rules, weightKg, perHour * hours),
    ml_per_kg_per_hour: perHour,
  };
}

export function samRehydration(rules, weightKg) {
  const rule = rules.sam_rehydration;
  return {
    first_2h_ml_every_30_min: ml(rules, weightKg, rule.first_ml_per_kg),
    then_ml_per_hour_low: ml(rules, weightKg, rule.then_ml_per_kg_per_hour_low),
    then_ml_per_hour_high: ml(rules, weightKg, rule.then_ml_per_kg_per_hour_high),
    max_hours: rule.max_hours,
    first_ml_per_kg: rule.first_ml_per_kg,
    interval_minutes: rule.first_interval_minutes,
    first_hours: rule.first_hours,
    then_ml_per_kg_per_hour_low: rule.then_ml_per_kg_per_hour_low,
    then_ml_per_kg_per_hour_high: rule.then_ml_per_kg_per_hour_high,
  };
}

export function samShockIv(rules, weightKg) {
  const rule = rules.sam_shock_iv;
  return {
    fluid: rule.fluid,
    steps: [{ ml: ml(rules, weightKg, rule.ml_per_kg), ml_per_kg: rule.ml_per_kg,
      minutes: rule.minutes }],
  };
}

export function zinc(rules, ageMonths, settings) {
  if (ageMonths < rules.zinc_min_age_months.value) return null;
  const upper = settings.zinc_max_age_months;
  if (upper !== null && upper !== undefined && ageMonths >= upper) return null;
  const row = rowBelow(rules.zinc.rows, 'max_age_months', ageMonths);
  if (row === null) return null;
  return { mg_per_day: row.mg_per_day, days_min: settings.zinc_days_min,
    days_max: settings.zinc_days_max };
}
