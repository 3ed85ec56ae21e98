// Every clinical number reaches the engine through the rulebook JSON: the engine's source may
// hold no numeric literal but these non-clinical ones:
//   0, 1, 2  counting, indexing, the L/M/S columns, "1 / 2" (the half of round-half-up)
//            and "1 / l" (the LMS inverse power);
//   10, 100  the WHO growth tables' 0.1 cm grid (x * 10) and z rounded to 2 decimals (z * 100);
//   -1       "not found" (written as unary minus on 1);
//   12       months in a year, only as `const MONTHS_PER_YEAR = 12;` (calendar, not clinical).
import assert from 'node:assert/strict';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { test } from 'node:test';
import { ROOT } from './rulebook.mjs';

const ALLOWED = new Set([0, 1, 2, 10, 100]);
const CALENDAR = 'const MONTHS_PER_YEAR = 12;';

function engineFiles() {
  const dir = join(ROOT, 'static', 'js', 'engine');
  return [join(ROOT, 'static', 'js', 'engine.js'),
    ...readdirSync(dir).filter((f) => f.endsWith('.js')).map((f) => join(dir, f))];
}

// Source without comments, string text and regex literals; template expressions are kept.
export function codeOnly(source) {
  return source
    .replace(/\/\*[\s\S]*?\*\//g, ' ')
    .replace(/\/\/[^\n]*/g, ' ')
    .replace(/'(?:[^'\\\n]|\\.)*'|"(?:[^"\\\n]|\\.)*"/g, "''")
    .replace(/`((?:[^`\\]|\\.)*)`/g, (_m, body) => (body.match(/\$\{[^}]*\}/g) || []).join(' '))
    .replace(/([=(,:]\s*)\/(?:[^/\\\n]|\\.)+\/[a-z]*/g, '$1null')
    .replace(CALENDAR, '');
}

export function numericLiterals(code) {
  const found = code.match(/(?<![\w$.])(?:0[xob][\da-f_]+|\d[\d_]*(?:\.\d*)?(?:e[+-]?\d+)?|\.\d+(?:e[+-]?\d+)?)n?/gi);
  return (found || []).map((text) => Number(text.replace(/_/g, '').replace(/n$/, '')));
}

test('the literal scanner sees numbers and skips comments, strings and regexes', () => {
  const code = codeOnly("x = 75 * w; // 30 ml/kg\ny = '5 ml'; z = /[0-9]/g; t = `${a * 0.5} 20`;");
  assert.deepEqual(numericLiterals(code), [75, 0.5]);
  assert.deepEqual(numericLiterals('a1 = b2 + 1e3 + .7 + 0x1F + 1_000'), [1000, 0.7, 31, 1000]);
});

test('the engine holds no clinical number: all of them come from the rulebook', () => {
  for (const file of engineFiles()) {
    const source = readFileSync(file, 'utf8');
    const bad = numericLiterals(codeOnly(source)).filter((n) => !ALLOWED.has(n));
    assert.deepEqual(bad, [], `${file} has numeric literals ${bad.join(', ')}`);
  }
});

test('the one calendar constant is declared exactly once', () => {
  const all = engineFiles().map((f) => readFileSync(f, 'utf8')).join('\n');
  assert.equal(all.split(CALENDAR).length - 1, 1);
});
