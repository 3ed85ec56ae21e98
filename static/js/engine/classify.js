// Classification: the JavaScript twin of clinic_app/clinical/classify.py.

export function isYoungInfant(rules, ageMonths) {
  return ageMonths < rules.young_infant_signs.max_age_months_exclusive;
}

export function severity(rules, signs, ageMonths) {
  const rule = rules.dehydration_signs;
  const rows = isYoungInfant(rules, ageMonths) ? rules.young_infant_signs.rows : rule.rows;
  const levels = rows.map((row) => row.levels[signs[row.field]]);
  if (levels.filter((x) => x >= rule.severe_level).length >= rule.min_signs) return 'severe';
  if (levels.filter((x) => x >= rule.some_level).length >= rule.min_signs) return 'some';
  return 'none';
}

export function dangerSigns(rules, inp) {
  const found = [...inp.danger_signs];
  for (const item of rules.danger_signs.from_signs) {
    if (inp.signs[item.field] === item.value) found.push(`${item.field}:${item.value}`);
  }
  return found;
}

export function inMalnutritionAges(rules, ageMonths) {
  const rule = rules.acute_malnutrition;
  return rule.min_age_months <= ageMonths && ageMonths < rule.max_age_months_exclusive;
}

export function malnutrition(rules, inp, wflhZ) {
  if (!inMalnutritionAges(rules, inp.age_months)) return null;
  const rule = rules.acute_malnutrition;
  const muac = inp.muac_mm;
  if (inp.oedema_both_feet
      || (muac !== null && muac < rule.muac_severe_below_mm)
      || (wflhZ !== null && wflhZ < rule.wflh_severe_below_z)) {
    return 'sam';
  }
  if ((muac !== null && muac < rule.muac_moderate_below_mm)
      || (wflhZ !== null && wflhZ < rule.wflh_moderate_below_z)) {
    return 'mam';
  }
  return null;
}

export function isPersistent(rules, inp) {
  const days = inp.diarrhoea_days;
  return days !== null && days >= rules.persistent_diarrhoea.min_days;
}

function matches(inp, item) {
  if (item.group === 'signs') return inp.signs[item.field] === item.value;
  return inp.danger_signs.includes(item.field) === item.value;
}

function choleraSevereDehydration(rules, inp) {
  const rule = rules.cholera;
  if (rule.severe_any_of.some((item) => matches(inp, item))) return true;
  return rule.severe_two_of.filter((item) => matches(inp, item)).length >= rule.severe_min_count;
}

export function suspectedCholera(rules, inp, outbreak) {
  const rule = rules.cholera;
  const watery = !inp.blood_in_stool;
  const acute = inp.diarrhoea_days === null || inp.diarrhoea_days < rule.acute_max_days_exclusive;
  if (!(watery && acute)) return false;
  return outbreak || (inp.age_months >= rule.min_age_months && choleraSevereDehydration(rules, inp));
}
