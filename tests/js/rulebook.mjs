// Test helper: rulebook JSON from the Python core (tests/js/export_rulebook.py), so the node
// tests always check the engine against the rules the server applies right now.
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');

function python() {
  if (process.env.PYTHON) return process.env.PYTHON;
  const venv = join(ROOT, '.venv', 'bin', 'python');
  return existsSync(venv) ? venv : 'python3';
}

// One rulebook per settings override object, exported in one Python run.
export function exportRulebooks(overrides) {
  const out = execFileSync(python(), [join(ROOT, 'tests', 'js', 'export_rulebook.py')], {
    input: JSON.stringify(overrides), maxBuffer: 1 << 30, cwd: ROOT,
  });
  return JSON.parse(out);
}
