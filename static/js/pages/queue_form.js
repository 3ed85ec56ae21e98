// Monitoring and outcome forms on the phone: the record is queued in the outbox (with an id
// made here) and sent when the clinic is in reach, so a CHW can keep recording offline.
// Once the server has it, the page reloads to show the new totals. Without JavaScript the
// form posts to the server as usual.
import { app, username } from "../app.js";

const form = document.querySelector("form[data-queue-kind]");
const note = document.getElementById("queue-note");
const kind = form.dataset.queueKind;
const caseId = form.dataset.caseId;

function values() {
  return Object.fromEntries(new FormData(form));
}

function number(text) {
  return text === undefined || text === "" ? null : Number(text);
}

function monitoringPayload(v, id, now) {
  const minutes = number(v.minutes_ago) || 0;
  return { id, case_id: caseId, at: new Date(now - minutes * 60_000).toISOString(),
           what: v.what, ml: number(v.ml), cups: number(v.cups),
           puffy_eyelids: v.puffy_eyelids === "y", not_improving: v.not_improving === "y" };
}

function outcomePayload(v, id, now) {
  const at = new Date(now).toISOString();
  return { id, case_id: caseId, at, outcome: v.outcome, improving: v.improving === "y",
           referred_to: v.referred_to || null, transport: v.transport || null,
           referred_at: v.outcome === "referred"
             ? new Date(now - (number(v.referred_minutes_ago) || 0) * 60_000).toISOString() : null,
           followup_date: v.followup_date || null };
}

const BUILD = { monitoring: monitoringPayload, outcome: outcomePayload };

form.addEventListener("submit", async (event) => {
  if (!username || !form.checkValidity()) return;
  const v = values();
  // Incomplete forms go to the server, which explains what is missing.
  if (kind === "outcome" && !v.outcome) return;
  if (kind === "monitoring" && ["ors", "other"].includes(v.what) && !v.ml && !v.cups) return;
  event.preventDefault();
  const services = await app;
  if (!services) { form.submit(); return; }
  const id = crypto.randomUUID();
  const payload = BUILD[kind](v, id, Date.now());
  await services.outbox.add({ kind, id, owner: username, payload });
  form.reset();
  note.hidden = false;
  await services.refresh();
  const summary = await services.scheduler.trigger();
  if (summary && summary.ok && summary.waiting === 0) location.reload();
});
