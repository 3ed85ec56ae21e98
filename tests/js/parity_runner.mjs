// Batch runner for tests/clinical/test_parity.py: one node process assesses every input.
// Usage: node tests/js/parity_runner.mjs <in.json> <out.json>
// in.json: {"rulebooks": [<rulebook JSON>, ...], "cases": [{"rulebook": <index>, "input": ...}]}
// out.json: [<assess() result or {"error": ...} or {"crash": "<message>"}>, ...] in case order.
import { readFileSync, writeFileSync } from 'node:fs';
import { assess } from '../../static/js/engine.js';

const [inPath, outPath] = process.argv.slice(2);
const batch = JSON.parse(readFileSync(inPath, 'utf8'));
const results = batch.cases.map(({ rulebook, input }) => {
  try {
    return assess(input, batch.rulebooks[rulebook]);
  } catch (exc) {
    return { crash: String(exc && exc.stack ? exc.stack : exc) };
  }
});
writeFileSync(outPath, JSON.stringify(results));
