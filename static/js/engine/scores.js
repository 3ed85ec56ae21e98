// Published dehydration scores: the JavaScript twin of clinic_app/clinical/scores.py.
import { isObject, own, render, replaceAll, setOwn } from './text.js';

// result key -> [rulebook key, input object, which items (rule key or null), bands key]
const SCALES = [
  ['cds', 'score_cds', 'cds', null, 'bands'],
  ['gorelick_10', 'score_gorelick', 'gorelick', null, 'bands_10'],
  ['gorelick_4', 'score_gorelick', 'gorelick', 'four_item_names', 'bands_4'],
  ['dhaka', 'score_dhaka', 'dhaka', null, 'bands'],
];
const INPUT_SCALES = { cds: 'score_cds', gorelick: 'score_gorelick', dhaka: 'score_dhaka' };

function text(rules, code, values) {
  return render(rules.score_messages.texts[code], values);
}

// Field errors in input.score_items, keyed score_items.<scale>[.<item>].
export function scoreItemErrors(rules, input) {
  const given = own(input, 'score_items') ? input.score_items : null;
  if (given === null) return {};
  if (!isObject(given)) return { score_items: text(rules, 'not_object', {}) };
  const errors = {};
  for (const [scale, items] of Object.entries(given)) {
    const key = `score_items.${scale}`;
    if (!own(INPUT_SCALES, scale)) {
      setOwn(errors, key, text(rules, 'unknown_scale', { choices: Object.keys(INPUT_SCALES).join(', ') }));
      continue;
    }
    if (!isObject(items)) {
      setOwn(errors, key, text(rules, 'not_object', {}));
      continue;
    }
    const rule = rules[INPUT_SCALES[scale]];
    const points = rule.items.points;
    for (const [item, finding] of Object.entries(items)) {
      if (!own(points, item)) {
        setOwn(errors, `${key}.${item}`, text(rules, 'unknown_item', { name: rule.name }));
      } else if (finding !== null && !(typeof finding === 'string' && own(points[item], finding))) {
        setOwn(errors, `${key}.${item}`, text(rules, 'invalid_item',
          { choices: Object.keys(points[item]).join(', ') }));
      }
    }
  }
  return errors;
}

function band(rows, score) {
  for (const row of rows) {
    if (row.min <= score && score <= row.max) return row.band;
  }
  throw new Error(`score ${score} is outside every band`);
}

function one(rules, scale, entered, ageMonths) {
  const [, ruleKey, , subsetKey, bandsKey] = scale;
  const rule = rules[ruleKey];
  const points = rule.items.points;
  const names = subsetKey ? rule[subsetKey].value : Object.keys(points);
  const value = (name) => (own(entered, name) ? entered[name] : null);
  if (names.some((name) => value(name) === null)) return null;
  let score = 0;
  let maxScore = 0;
  for (const name of names) {
    score += points[name][entered[name]];
    maxScore += Math.max(...Object.values(points[name]));
  }
  const bands = rule[bandsKey];
  const ages = rule.age_months;
  const unconfirmed = [['points', rule.items], ['bands', bands], ['age_range', ages]]
    .filter(([, entry]) => entry.status === 'unconfirmed').map(([part]) => part);
  const inRange = ages.min <= ageMonths && ageMonths < ages.below;
  return {
    score,
    max_score: maxScore,
    band: band(bands.rows, score),
    source: rule.source,
    warning: inRange ? null : text(rules, 'outside_age', { name: rule.name, ages: ages.text }),
    status: unconfirmed.length ? 'unconfirmed' : 'confirmed',
    unconfirmed,
    caution: unconfirmed.length
      ? text(rules, 'unconfirmed', { name: rule.name,
        parts: replaceAll(unconfirmed.join(', '), '_', ' ') })
      : null,
  };
}

// The scores whose items were all entered (input already validated).
export function computeScores(rules, input, ageMonths) {
  const given = (own(input, 'score_items') && input.score_items) || {};
  const results = {};
  for (const scale of SCALES) {
    const entered = (own(given, scale[2]) && given[scale[2]]) || {};
    const result = one(rules, scale, entered, ageMonths);
    if (result !== null) results[scale[0]] = result;
  }
  return results;
}
