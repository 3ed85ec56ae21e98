// Every page: install the service worker, offer updates, register the phone after login,
// and keep the outbox moving. Page scripts import `app` from here.
import { openOutbox, SyncScheduler } from "./outbox.js";

const body = document.body;
export const username = body.dataset.user || "";
let words = {};
try {
  words = JSON.parse(document.getElementById("app-words")?.textContent || "{}");
} catch {
  words = {};
}

function say(key, n) {
  return (words[key] || key).replace("%(n)s", String(n));
}

// --- service worker and the "new version ready" prompt ---------------------------------------
// Set when the user taps "reload now": the page reloads once the new worker takes over. (Not
// "was the page controlled at load": a page first opened while the worker was still
// installing is claimed later, and its update button must still reload it.)
let updateAsked = false;

function offerUpdate(worker) {
  if (document.getElementById("update-ready")) return;
  const bar = document.createElement("div");
  bar.id = "update-ready";
  bar.className = "update-bar";
  bar.setAttribute("role", "status");
  const text = document.createElement("span");
  text.textContent = say("update_ready");
  const button = document.createElement("button");
  button.type = "button";
  button.textContent = say("update_reload");
  button.addEventListener("click", () => {
    updateAsked = true;
    worker.postMessage({ type: "SKIP_WAITING" });
  });
  bar.append(text, button);
  body.prepend(bar);
}

async function startServiceWorker() {
  if (!("serviceWorker" in navigator)) return;
  let reloading = false;
  navigator.serviceWorker.addEventListener("controllerchange", () => {
    if (updateAsked && !reloading) { reloading = true; location.reload(); }
  });
  try {
    const registration = await navigator.serviceWorker.register("/sw.js",
      { scope: "/", updateViaCache: "none" });
    if (registration.waiting && navigator.serviceWorker.controller) {
      offerUpdate(registration.waiting);
    }
    registration.addEventListener("updatefound", () => {
      const incoming = registration.installing;
      incoming?.addEventListener("statechange", () => {
        if (incoming.state === "installed" && navigator.serviceWorker.controller) {
          offerUpdate(incoming);
        }
      });
    });
  } catch {
    // No service worker (e.g. not a secure context): the app still works online.
  }
}

// --- the outbox ----------------------------------------------------------------------------
function showCount(waiting) {
  for (const el of document.querySelectorAll("[data-outbox-count]")) {
    el.textContent = waiting === 0 ? say("nothing_waiting") : say("waiting", waiting);
  }
}

function showSync(summary) {
  showCount(summary.waiting);
  // Records the server refused leave the count: say so, or they would vanish unnoticed.
  const parts = [];
  if (summary.sent) parts.push(say("sent", summary.sent));
  if (summary.rejected) parts.push(say("rejected", summary.rejected));
  if (!summary.ok) parts.push(say(summary.reason === "unreachable" ? "unreachable" : "not_sent"));
  for (const el of document.querySelectorAll("[data-outbox-state]")) {
    el.textContent = parts.join(" ");
  }
}

async function csrfToken() {
  const response = await fetch("/api/v1/me", { credentials: "same-origin", cache: "no-store" });
  if (!response.ok) return null;
  return (await response.json()).csrf_token;
}

/** Register this phone for the logged-in user once; the token lives only in IndexedDB. */
async function ensureDevice(outbox) {
  if (!username || !navigator.onLine || await outbox.device(username)) return;
  try {
    const token = await csrfToken();
    if (!token) return;
    const response = await fetch("/api/v1/devices", {
      method: "POST", credentials: "same-origin",
      headers: { "Content-Type": "application/json", "X-CSRFToken": token },
      body: JSON.stringify({ label: navigator.userAgent.slice(0, 100) }),
    });
    if (response.status === 201) {
      const device = await response.json();
      await outbox.setDevice(username, { device_id: device.device_id, token: device.token });
    }
  } catch {
    // Out of range: try again on the next page load.
  }
}

/**
 * After a sync, fetch the rulebook again when the clinic's version changed (an admin changed a
 * setting): the service worker's network-first rule puts the new one in its cache, so the next
 * offline assessment uses it.
 */
async function refreshRulebook(outbox, version) {
  if (!version || version === await outbox.meta("rulebook_version")) return;
  const response = await fetch("/api/v1/rulebook", { credentials: "same-origin" });
  if (response.ok && (await response.json()).version === version) {
    await outbox.setMeta("rulebook_version", version);
  }
}

async function startOutbox() {
  if (!("indexedDB" in globalThis)) return null;
  const outbox = await openOutbox();
  if (navigator.storage?.persist) navigator.storage.persist().catch(() => false);
  const onChange = (summary) => {
    showSync(summary);
    refreshRulebook(outbox, summary.rulebookVersion).catch(() => null);
  };
  const scheduler = new SyncScheduler(outbox, { fetchFn: (...args) => fetch(...args), onChange });
  const refresh = async () => showCount(await outbox.count());
  for (const button of document.querySelectorAll("[data-outbox-send]")) {
    button.addEventListener("click", () => scheduler.trigger());
  }
  window.addEventListener("online", () => scheduler.trigger());
  document.addEventListener("visibilitychange", () => {
    if (document.visibilityState === "visible") scheduler.trigger();
  });
  if (username) await ensureDevice(outbox);
  await refresh();
  scheduler.trigger();
  return { outbox, scheduler, refresh };
}

// Logging out drops the cached pages (they carry the user's name); the outbox stays, so
// records not yet sent are never lost.
for (const logout of document.querySelectorAll('form[action$="/logout"]')) {
  logout.addEventListener("submit", () => {
    navigator.serviceWorker?.controller?.postMessage({ type: "FORGET_PAGES" });
  });
}

startServiceWorker();
export const app = startOutbox().catch(() => null);
