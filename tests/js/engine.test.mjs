// The offline engine against every golden vector in tests/vectors/assessments.json.
// Each vector's "settings" are overrides of the clinic settings; "expected" is the server's
// answer without "rulebook_version" (checked separately against the rulebook's own version).
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { test } from 'node:test';
import { assess } from '../../static/js/engine.js';
import { exportRulebooks, ROOT } from './rulebook.mjs';

const vectors = JSON.parse(readFileSync(join(ROOT, 'tests', 'vectors', 'assessments.json'), 'utf8'));
const keys = [...new Set(vectors.map((v) => JSON.stringify(v.settings || {})))];
const rulebooks = new Map(
  exportRulebooks(keys.map((k) => JSON.parse(k))).map((rulebook, i) => [keys[i], rulebook]),
);

test('there are golden vectors to check, ok and error cases alike', () => {
  assert.ok(vectors.length >= 150, `only ${vectors.length} vectors`);
  assert.ok(vectors.some((v) => 'error' in v.expected));
  assert.ok(vectors.some((v) => !('error' in v.expected)));
});

for (const vector of vectors) {
  test(`it gives the server's answer for ${vector.name}`, () => {
    const rulebook = rulebooks.get(JSON.stringify(vector.settings || {}));
    const result = JSON.parse(JSON.stringify(assess(vector.input, rulebook)));
    if (!('error' in result)) {
      assert.equal(result.rulebook_version, rulebook.version);
      delete result.rulebook_version;
    }
    assert.deepEqual(result, vector.expected);
  });
}

test('it does not change the input or the rulebook it is given', () => {
  const rulebook = rulebooks.get('{}');
  const before = JSON.stringify(rulebook);
  for (const vector of vectors.filter((v) => !v.settings || !Object.keys(v.settings).length)) {
    const input = JSON.stringify(vector.input);
    assess(vector.input, rulebook);
    assert.equal(JSON.stringify(vector.input), input);
  }
  assert.equal(JSON.stringify(rulebook), before);
});
