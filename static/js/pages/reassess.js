// The reassessment page on the phone: classify the new signs with the offline engine, show
// the next plan at once, and queue the reassessment in the outbox (sent when in reach).
// Without the engine or the rulebook the form simply posts to the server.
import { app, username } from "../app.js";

const form = document.getElementById("reassess-form");
const out = document.getElementById("reassess-result");
const data = JSON.parse(document.getElementById("reassess-data").textContent);
const words = data.words;
const state = { engine: null, rulebook: null };
const DANGER_SIGNS = ["unable_to_drink_or_breastfeed", "vomits_everything", "convulsions", "shock"];

function fill(template, params) {
  return template.replace(/%\((\w+)\)s/g, (_, name) => String(params[name]));
}

async function load() {
  try {
    state.engine = await import("../engine.js");
    const response = await fetch("/api/v1/rulebook", { credentials: "same-origin" });
    if (response.ok) state.rulebook = await response.json();
  } catch {
    state.rulebook = null;
  }
  if (state.engine && state.rulebook) form.dataset.offlineReady = "1";
}

function newInput() {
  const values = Object.fromEntries(new FormData(form));
  const input = { ...data.input };
  // Danger signs are asked again: a child can deteriorate between assessments.
  input.danger_signs = Object.fromEntries(DANGER_SIGNS.map((name) => [name, values[name] === "y"]));
  input.signs = { condition: values.condition, eyes: values.eyes,
                  skin_pinch: values.skin_pinch };
  if (values.drinking) input.signs.drinking = values.drinking;
  if (values.weight_kg) input.weight_kg = Number(values.weight_kg);
  return input;
}

function line(tag, text, className) {
  const el = document.createElement(tag);
  el.textContent = text;
  if (className) el.className = className;
  return el;
}

function show(result) {
  const plan = line("p", `${fill(words.plan, { plan: result.plan })} · ${words[result.severity]}`,
                    "plan");
  const parts = [plan];
  const stool = result.per_stool_ml;
  if (stool && stool.low_ml) {
    parts.push(line("p", fill(words.per_stool, { low: stool.low_ml, high: stool.high_ml }),
                    "per-stool"));
  }
  const list = document.createElement("ul");
  list.className = "steps";
  list.append(...result.actions.map((action) => line("li", action.text)));
  parts.push(list, line("p", words.saved, "muted"));
  out.replaceChildren(...parts);
  out.hidden = false;
  form.hidden = true;
}

form.addEventListener("submit", async (event) => {
  if (!state.engine || !state.rulebook || !username) return;  // the server takes it
  const input = newInput();
  const result = state.engine.assess(input, state.rulebook);
  if (result.error) return;  // let the server explain the error in words
  event.preventDefault();
  const services = await app;
  if (!services) { form.submit(); return; }
  const id = crypto.randomUUID();
  const payload = { id, case_id: data.case_id, assessed_at: new Date().toISOString(), input,
                    result };
  await services.outbox.add({ kind: "reassessment", id, owner: username, payload });
  show(result);
  await services.refresh();
  services.scheduler.trigger();
});

load();
