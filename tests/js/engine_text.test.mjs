// The engine's text and rounding helpers behave as their Python twins in messages.py.
import assert from 'node:assert/strict';
import { test } from 'node:test';
import { fmt, render, roundVolume, setOwn, sortedKeys } from '../../static/js/engine/text.js';

test('it sorts keys by code point, as Python sorted() does', () => {
  // UTF-16 order would put the emoji (a surrogate pair) before U+FFFF.
  assert.deepEqual(sortedKeys(['\uffff', '\u{1F600}', 'b', 'a', 'B']),
    ['B', 'a', 'b', '\uffff', '\u{1F600}']);
  assert.deepEqual(sortedKeys({ z: 1, y: 2 }), ['y', 'z']);
});

test('it fills placeholders in one pass and spells values as Python str() does', () => {
  assert.equal(render('{a} and {b}', { a: '{b}', b: 7 }), '{b} and 7');
  assert.equal(fmt(null), 'None');
  assert.equal(fmt(true), 'True');
  assert.equal(fmt(12.5), '12.5');
  assert.throws(() => render('{missing}', {}), /missing/);
});

test('it rounds volumes half up to the rulebook precision', () => {
  const rules = { volume_rounding_ml: { value: 5 } };   // common practice, no source
  assert.equal(roundVolume(rules, 902.5), 905);
  assert.equal(roundVolume(rules, 902.4999), 900);
  assert.equal(roundVolume(rules, 12.5), 15);   // banker's rounding would give 10
});

test('it can record a field error for a key named __proto__', () => {
  const errors = {};
  setOwn(errors, '__proto__', 'unknown');
  assert.equal(JSON.stringify(errors), '{"__proto__":"unknown"}');
});
