import { app } from "../app.js";
import { openOutbox } from "../outbox.js";

// "Device ready?" page: four checks a phone must pass before it goes out of range.
// No DOM work outside this page; strings come from data-* attributes (translated server-side).

const summary = document.getElementById("ready-summary");
const text = summary.dataset;

// The device token is kept by the outbox (static/js/outbox.js) per user name; app.js registers
// the phone after login. Waiting for `app` lets a first visit finish that registration.
const WORKER_WAIT_MS = 15000;

async function deviceTokenPresent() {
  const user = document.body.dataset.user;
  if (!user || !("indexedDB" in window)) return false;
  await app;
  const outbox = await openOutbox();
  try {
    const device = await outbox.device(user);
    return Boolean(device && typeof device.token === "string" && device.token);
  } finally {
    outbox.db.close();
  }
}

async function serviceWorkerActive() {
  if (!("serviceWorker" in navigator)) return false;
  // app.js registers the worker on every page; on a first visit it may still be installing.
  const timeout = new Promise((resolve) => setTimeout(() => resolve(null), WORKER_WAIT_MS));
  const registration = await Promise.race([navigator.serviceWorker.ready, timeout]);
  return Boolean(registration && registration.active);
}

async function storagePersistent() {
  if (!navigator.storage || !navigator.storage.persisted) return false;
  if (await navigator.storage.persisted()) return true;
  // Asking is harmless: the browser grants it to an installed or often-used app.
  return navigator.storage.persist ? navigator.storage.persist() : false;
}

const CHECKS = {
  secure: async () => window.isSecureContext === true,
  worker: serviceWorkerActive,
  storage: storagePersistent,
  device: deviceTokenPresent,
};

function show(item, ok) {
  item.dataset.ok = String(ok);
  item.querySelector(".mark").textContent = ok ? "✓" : "✗";
  item.querySelector(".state").textContent = ok ? text.yes : text.no;
}

async function run() {
  summary.textContent = text.checking;
  const results = {};
  for (const item of document.querySelectorAll("#ready-checks [data-check]")) {
    let ok = false;
    try {
      ok = await CHECKS[item.dataset.check]();
    } catch (error) {
      ok = false;
    }
    results[item.dataset.check] = ok;
    show(item, ok);
  }
  const allOk = Object.values(results).every(Boolean);
  summary.textContent = allOk ? text.ok : text.notOk;
  summary.dataset.state = allOk ? "ready" : "not-ready";
  document.getElementById("ready-help-secure").hidden = results.secure;
}

document.getElementById("ready-again").addEventListener("click", run);
run();
