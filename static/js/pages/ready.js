// "Device ready?" page: four checks a phone must pass before it goes out of range.
// No DOM work outside this page; strings come from data-* attributes (translated server-side).

const summary = document.getElementById("ready-summary");
const text = summary.dataset;

// The device token is written by the offline app (issue 4) into IndexedDB. Contract read here:
// some database of this origin has an object store "meta" holding, under the key "device",
// an object with a non-empty "token" (as answered by POST /api/v1/devices).
const DEVICE_STORE = "meta";
const DEVICE_KEY = "device";

function openDb(name) {
  return new Promise((resolve, reject) => {
    const request = indexedDB.open(name);
    request.onsuccess = () => resolve(request.result);
    request.onerror = () => reject(request.error);
    request.onupgradeneeded = () => request.transaction.abort(); // never create a database here
  });
}

function readKey(db, store, key) {
  return new Promise((resolve, reject) => {
    const request = db.transaction(store, "readonly").objectStore(store).get(key);
    request.onsuccess = () => resolve(request.result);
    request.onerror = () => reject(request.error);
  });
}

async function deviceTokenPresent() {
  if (!("indexedDB" in window) || !indexedDB.databases) return false;
  for (const info of await indexedDB.databases()) {
    let db;
    try {
      db = await openDb(info.name);
      if (db.objectStoreNames.contains(DEVICE_STORE)) {
        const record = await readKey(db, DEVICE_STORE, DEVICE_KEY);
        const token = record && (record.token || (record.value && record.value.token));
        if (typeof token === "string" && token.length > 0) return true;
      }
    } catch (error) {
      // A database we cannot read is not the app's: keep looking.
    } finally {
      if (db) db.close();
    }
  }
  return false;
}

async function serviceWorkerActive() {
  if (!("serviceWorker" in navigator)) return false;
  const registration = await navigator.serviceWorker.getRegistration("/");
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
