// The offline caregiver sheet: /sheet/offline#<case id>. Reads the case from this phone's
// outbox (waiting to sync) or its kept copy of the worker's own cases, the cached rulebook and
// the JSON catalog of the chosen language, then draws the sheet (static/js/sheet_offline.js).
import { load, t } from '../i18n.js';
import { openOutbox } from '../outbox.js';
import { buildSheet, renderSheet } from '../sheet_offline.js';

const root = document.getElementById('sheet-root');
const status = document.getElementById('sheet-status');
const select = document.getElementById('sheet-lang');

async function findCase(outbox, owner, id) {
  const waiting = (await outbox.items()).find((item) => item.kind === 'case' && item.id === id);
  if (waiting) return waiting.payload;
  const kept = (await outbox.recent(owner, Infinity)).find((row) => row.id === id);
  return kept && kept.input && kept.result ? kept : null;
}

async function draw(record, rulebook) {
  const catalog = await load(select.value);
  document.documentElement.lang = catalog.locale;
  document.documentElement.dir = catalog.dir;
  const sheet = buildSheet(record, { rules: rulebook.rules, settings: rulebook.settings,
    lang: catalog.locale, clinic: { name: root.dataset.clinicName, phone: root.dataset.clinicPhone } });
  root.innerHTML = renderSheet(sheet, t);
}

async function main() {
  const id = decodeURIComponent(location.hash.slice(1));
  const outbox = await openOutbox();
  const record = id ? await findCase(outbox, root.dataset.username, id) : null;
  if (!record) {
    status.textContent = root.dataset.notFound;
    return;
  }
  const response = await fetch(root.dataset.rulebookUrl, { credentials: 'same-origin' });
  const rulebook = await response.json();
  if (record.caregiver_language && [...select.options].some((o) => o.value === record.caregiver_language)) {
    select.value = record.caregiver_language;
  }
  select.addEventListener('change', () => draw(record, rulebook));
  document.getElementById('print-sheet').addEventListener('click', () => window.print());
  await draw(record, rulebook);
}

// Another case chosen on the same page (only the #fragment changes): draw that one.
window.addEventListener('hashchange', () => window.location.reload());
main().catch(() => { status.textContent = root.dataset.notFound; });
