// The assessment page on the phone: compute with the offline engine and the cached rulebook,
// draw the result into the server's own <template>, save the case to the outbox.
// Without the engine or the rulebook the form simply posts to the server.
import { app, username } from "../app.js";
import { buildInput, present } from "./assess_view.js";

const form = document.getElementById("assess-form");
const resultArea = document.getElementById("result-area");
const saveFields = document.getElementById("save-fields");
const errorBox = document.getElementById("assess-error");
const saveStatus = document.getElementById("save-status");
const words = JSON.parse(document.getElementById("assess-words").textContent);
const state = { engine: null, rulebook: null, input: null, result: null };

async function loadEngine() {
  try {
    const module = await import("../engine.js");
    if (typeof module.assess === "function") state.engine = module;
  } catch {
    state.engine = null;  // not available: the server computes instead
  }
}

async function loadRulebook() {
  try {
    const response = await fetch(form.dataset.rulebookUrl, { credentials: "same-origin" });
    if (response.ok) state.rulebook = await response.json();
  } catch {
    state.rulebook = null;
  }
}

function formValues() {
  const values = {};
  for (const [name, value] of new FormData(form)) values[name] = value;
  return values;
}

function fillList(list, items, make) {
  list.replaceChildren(...items.map(make));
}

function item(text) {
  const li = document.createElement("li");
  li.textContent = text;
  return li;
}

function scheduleRow(row) {
  const tr = document.createElement("tr");
  const th = document.createElement("th");
  th.scope = "row";
  th.textContent = row.hour;
  tr.append(th);
  for (const text of [row.ml, row.cups, row.spoons]) {
    const td = document.createElement("td");
    td.textContent = text;
    tr.append(td);
  }
  return tr;
}

/** Fill the server's empty result card through its data-slot names. */
export function drawResult(view) {
  const card = document.getElementById("result-template").content.firstElementChild
    .cloneNode(true);
  const slot = (name) => card.querySelector(`[data-slot="${name}"]`);
  card.dataset.severity = view.severity;
  for (const name of ["severity_text", "plan_text", "ors_text", "cup_text", "per_stool_text",
                      "zinc_text", "refer_text", "facility_text"]) {
    slot(name).textContent = view[name];
  }
  slot("ors_block").hidden = !view.ors_text;
  slot("per_stool_text").hidden = !view.per_stool_text;
  slot("zinc_text").hidden = !view.zinc_text;
  fillList(slot("actions"), view.actions, item);
  fillList(slot("cautions"), view.cautions, item);
  fillList(slot("schedule"), view.schedule, scheduleRow);
  resultArea.replaceChildren(card);
}

function showError(error) {
  const fields = error && error.fields ? Object.values(error.fields) : [];
  errorBox.textContent = fields.length ? fields.join(" ") : String(error && error.message || error);
  errorBox.hidden = false;
  const confirm = document.getElementById("confirm-weight");
  if (confirm && error && error.code === "implausible_weight") confirm.hidden = false;
}

function assessHere() {
  errorBox.hidden = true;
  const input = buildInput(formValues(), state.rulebook.rules);
  let result;
  try {
    result = state.engine.assess(input, state.rulebook);
  } catch (error) {
    showError(error);
    return;
  }
  if (result && result.error) {
    showError(result.error);
    return;
  }
  state.input = input;
  state.result = result;
  drawResult(present(result, state.rulebook.settings, input.age_months, state.rulebook.rules,
                     words));
  performance.mark("result-drawn");
  document.getElementById("save-case_id").value = crypto.randomUUID();
  saveFields.hidden = false;
  saveStatus.textContent = "";
  document.getElementById("saved-note").hidden = true;
  resultArea.scrollIntoView({ block: "start" });
}

function count(name) {
  const value = parseInt(form.elements[name].value, 10);
  return Number.isFinite(value) && value > 0 ? value : 0;
}

function text(name) {
  const value = form.elements[name].value.trim();
  return value === "" ? null : value;
}

async function saveHere() {
  const ctx = await app;
  if (!ctx || !state.result) return;
  const id = document.getElementById("save-case_id").value || crypto.randomUUID();
  const payload = {
    id, created_at: new Date().toISOString(), area: form.dataset.area || "",
    input: state.input, result: state.result,
    given: { ors_sachets: count("save-ors_sachets"), zinc_tablets: count("save-zinc_tablets") },
    referral_made: form.elements["save-referral_made"].checked,
    caregiver_language: text("save-caregiver_language") || "",
    household_ref: text("save-household_ref"), note: text("save-note"),
  };
  await ctx.outbox.add({ kind: "case", id, owner: username, payload });
  await ctx.outbox.remember(username, { id, created_at: payload.created_at,
    severity_text: words[`severity_${state.result.severity}`], plan: state.result.plan,
    household_ref: payload.household_ref,
    // Kept for the offline caregiver sheet (/sheet/offline#<id>).
    input: state.input, result: state.result, caregiver_language: payload.caregiver_language });
  await ctx.refresh();
  form.reset();
  resultArea.replaceChildren();
  saveFields.hidden = true;
  state.result = null;
  saveStatus.textContent = "";
  document.getElementById("saved-note").hidden = false;
  window.scrollTo(0, 0);
  await showRecent(ctx);
  ctx.scheduler.trigger();
}

async function showRecent(ctx) {
  const rows = await ctx.outbox.recent(username, 10);
  const section = document.getElementById("recent");
  section.hidden = rows.length === 0;
  fillList(document.getElementById("recent-list"), rows, (row) => item(
    [row.created_at.slice(0, 16).replace("T", " "), row.severity_text,
     words[`plan_${row.plan}`] || row.plan,
     row.household_ref || ""].filter(Boolean).join(" · ")));
}

form.addEventListener("submit", (event) => {
  // Decide synchronously: without the engine and rulebook the server answers the post.
  if (!state.engine || !state.rulebook) return;
  event.preventDefault();
  const action = event.submitter ? event.submitter.value : "assess";
  if (action === "save") saveHere();
  else assessHere();
});

const noScale = form.elements.no_scale;
noScale.addEventListener("change", () => {
  form.elements.weight_kg.disabled = noScale.checked;
});

for (const button of document.querySelectorAll("[data-outbox-send]")) button.hidden = false;
Promise.all([loadEngine(), loadRulebook()]).then(() => {
  form.dataset.ready = state.engine && state.rulebook ? "offline" : "server";
});
app.then((ctx) => ctx && showRecent(ctx));
