// The phone's offline sheet against the server's: same content from the same case, for every
// language (the server's dict comes from clinic_app/caregiver_sheet.py via export_sheet.py).
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { test } from 'node:test';
import { useCatalog, t } from '../../static/js/i18n.js';
import { buildSheet, renderSheet } from '../../static/js/sheet_offline.js';
import { ROOT } from './rulebook.mjs';

const venv = join(ROOT, '.venv', 'bin', 'python');
const data = JSON.parse(execFileSync(existsSync(venv) ? venv : 'python3',
  [join(ROOT, 'tests', 'js', 'export_sheet.py')], { encoding: 'utf8', maxBuffer: 1 << 26 }));

// ICU (the browser's Intl) writes Spanish four-digit numbers without grouping ("1200"), where
// Babel writes "1.200": the one known difference; both are correct Spanish.
const normalise = (lang, text) => (lang === 'es' ? String(text).replace(/(\d)\.(\d{3})/g, '$1$2') : text);

function comparable(sheet, lang) {
  return JSON.parse(JSON.stringify(sheet), (key, value) => (typeof value === 'string' ? normalise(lang, value) : value));
}

test('there are example cases in every language', () => {
  assert.equal(data.cases.length, 3);
  assert.equal(Object.keys(data.cases[0].sheets).length, 7);
});

for (const [i, example] of data.cases.entries()) {
  for (const [lang, expected] of Object.entries(example.sheets)) {
    test(`case ${i + 1}, ${lang}: the offline sheet says what the printed sheet says`, () => {
      const actual = buildSheet(example.record, { rules: data.rules, settings: data.settings, lang });
      assert.deepEqual(comparable(actual, lang), comparable(expected, lang));
    });
  }
}

test('the offline markup carries the amounts, the danger signs and the caution', () => {
  useCatalog({ locale: 'en', dir: 'ltr', messages: {} });
  const sheet = buildSheet(data.cases[0].record, { rules: data.rules, settings: data.settings, lang: 'en' });
  const html = renderSheet(sheet, t);
  assert.match(html, /1,200 mL/); // S04: 75 ml/kg x 16 kg
  assert.match(html, /Cup = 250 mL/);
  // S10: 10 days at least, up to 14: ten solid squares, then four dashed.
  const required = html.match(/<span class="days">([^<]*)<\/span>/)[1];
  const extra = html.match(/<span class="days extra">([^<]*)<\/span>/)[1];
  assert.deepEqual(required.split('&#8203;').filter(Boolean).map((c) => c.replaceAll('&#8199;', '')),
    ['1', '2', '3', '4', '5', '6', '7', '8', '9', '10']);
  assert.deepEqual(extra.split('&#8203;').filter(Boolean).map((c) => c.replaceAll('&#8199;', '')),
    ['11', '12', '13', '14']);
  // Every cell is six figure widths: the squares of the background line up with the days.
  for (const cell of (required + extra).split('&#8203;').filter(Boolean)) {
    assert.equal(cell.replace(/&#8199;/g, ' ').length, 6, cell);
  }
  assert.match(html, /class="pic pic-sign_blood"/);
  assert.match(html, /class="pic pic-sachet-bottle"/);
  assert.match(html, /Local protocols and the health worker&#39;s advice come first\./);
  assert.match(html, /Referral: Mbeza District Hospital/);
});
