// The phone's outbox: records made offline wait in IndexedDB until the clinic server has
// acknowledged each one. No DOM here: the page wires the triggers (see app.js).
//
// An item is {kind, id, owner, payload}. Each kind maps to one upload endpoint, so later
// record kinds (reassessment, monitoring, outcome) only add a line to KINDS.

export const DB_NAME = "clinic-outbox";
const DB_VERSION = 1;
const STRICT = { durability: "strict" };
export const PING_URL = "/api/v1/ping";
export const PING_TIMEOUT_MS = 3000;
export const BATCH_SIZE = 50;
export const RECENT_LIMIT = 50;
export const BACKOFF_MIN_MS = 30_000;
export const BACKOFF_MAX_MS = 600_000;

// kind -> {url, field}: POST {[field]: [payload, ...]} to url, answered {results: [{id, status}]}.
export const KINDS = {
  case: { url: "/api/v1/cases", field: "cases" },
  reassessment: { url: "/api/v1/reassessments", field: "reassessments" },
  monitoring: { url: "/api/v1/monitoring", field: "entries" },
  outcome: { url: "/api/v1/outcomes", field: "outcomes" },
};

export function registerKind(kind, spec) {
  KINDS[kind] = spec;
}

// Statuses after which the server holds the record (or kept it for review): drop it here.
const ACKED = new Set(["created", "duplicate", "conflict"]);

function promised(request) {
  return new Promise((resolve, reject) => {
    request.onsuccess = () => resolve(request.result);
    request.onerror = () => reject(request.error);
  });
}

function done(tx) {
  return new Promise((resolve, reject) => {
    tx.oncomplete = () => resolve();
    tx.onerror = () => reject(tx.error);
    tx.onabort = () => reject(tx.error || new Error("transaction aborted"));
  });
}

export function openOutbox(idb = globalThis.indexedDB, name = DB_NAME) {
  const request = idb.open(name, DB_VERSION);
  request.onupgradeneeded = () => {
    const db = request.result;
    db.createObjectStore("items", { keyPath: "key" }).createIndex("owner", "owner");
    db.createObjectStore("failed", { keyPath: "key" });
    db.createObjectStore("devices", { keyPath: "username" });
    db.createObjectStore("recent", { keyPath: "id" }).createIndex("owner", "owner");
    db.createObjectStore("meta", { keyPath: "name" });
  };
  return promised(request).then((db) => new Outbox(db));
}

export class Outbox {
  constructor(db) {
    this.db = db;
  }

  async _write(stores, work) {
    const tx = this.db.transaction(stores, "readwrite", STRICT);
    const finished = done(tx);
    const value = work(tx);
    await finished;
    return value;
  }

  async _read(store, work) {
    const tx = this.db.transaction(store, "readonly");
    return promised(work(tx.objectStore(store)));
  }

  /** Queue a record; a second add with the same kind and id replaces the waiting copy. */
  add({ kind, id, owner, payload }) {
    if (!KINDS[kind]) throw new Error(`unknown outbox kind: ${kind}`);
    if (!id || !owner) throw new Error("an outbox item needs an id and an owner");
    const item = { key: `${kind}:${id}`, kind, id, owner, payload, queued_at: Date.now() };
    return this._write(["items"], (tx) => { tx.objectStore("items").put(item); });
  }

  items() {
    return this._read("items", (store) => store.getAll());
  }

  async count(owner) {
    const all = await this.items();
    return owner ? all.filter((item) => item.owner === owner).length : all.length;
  }

  failed() {
    return this._read("failed", (store) => store.getAll());
  }

  _ack(done, failed) {
    return this._write(["items", "failed"], (tx) => {
      for (const item of done) tx.objectStore("items").delete(item.key);
      for (const { item, error } of failed) {
        tx.objectStore("items").delete(item.key);
        tx.objectStore("failed").put({ ...item, error });
      }
    });
  }

  setDevice(username, device) {
    return this._write(["devices"], (tx) => {
      tx.objectStore("devices").put({ username, ...device });
    });
  }

  device(username) {
    return this._read("devices", (store) => store.get(username));
  }

  forgetDevice(username) {
    return this._write(["devices"], (tx) => { tx.objectStore("devices").delete(username); });
  }

  /** Keep a readable copy of the worker's own record (the newest RECENT_LIMIT per owner). */
  async remember(owner, record) {
    const mine = await this.recent(owner, Infinity);
    const stale = mine.slice(RECENT_LIMIT - 1);
    return this._write(["recent"], (tx) => {
      const store = tx.objectStore("recent");
      for (const old of stale) store.delete(old.id);
      store.put({ ...record, owner });
    });
  }

  /** The owner's remembered records, newest first. */
  async recent(owner, limit = RECENT_LIMIT) {
    const tx = this.db.transaction("recent", "readonly");
    const rows = await promised(tx.objectStore("recent").index("owner").getAll(owner));
    rows.sort((a, b) => String(b.created_at).localeCompare(String(a.created_at)));
    return rows.slice(0, limit);
  }

  async setMeta(name, value) {
    return this._write(["meta"], (tx) => { tx.objectStore("meta").put({ name, value }); });
  }

  async meta(name) {
    const row = await this._read("meta", (store) => store.get(name));
    return row ? row.value : undefined;
  }
}

/** GET /api/v1/ping with a timeout: is the clinic server in reach? */
export async function probe(fetchFn, timeoutMs = PING_TIMEOUT_MS) {
  const controller = new AbortController();
  const timer = setTimeout(() => controller.abort(), timeoutMs);
  try {
    const response = await fetchFn(PING_URL, { cache: "no-store", signal: controller.signal });
    if (!response.ok) return false;
    const body = await response.json();
    return body.ok === true;  // the service worker answers {"ok": false} when out of range
  } catch {
    return false;
  } finally {
    clearTimeout(timer);
  }
}

function groups(items) {
  const out = new Map();
  for (const item of items) {
    const key = `${item.kind}\u0000${item.owner}`;
    if (!out.has(key)) out.set(key, []);
    out.get(key).push(item);
  }
  return [...out.values()];
}

/**
 * One sync attempt. Returns {ok, reason, sent, rejected, waiting, rulebookVersion}; ok is false
 * when the server was out of reach or refused the phone (reason "unreachable" | "unregistered" |
 * "server"). rulebookVersion is the version the server has in force, when it answered.
 */
export async function syncOnce(outbox, fetchFn) {
  const summary = { ok: true, reason: null, sent: 0, rejected: 0, waiting: 0 };
  const items = await outbox.items();
  if (items.length === 0) return summary;
  if (!(await probe(fetchFn))) return { ...summary, ok: false, reason: "unreachable",
                                        waiting: items.length };
  for (const group of groups(items)) {
    const { kind, owner } = group[0];
    const device = await outbox.device(owner);
    if (!device) { summary.ok = false; summary.reason = "unregistered"; continue; }
    for (let start = 0; start < group.length; start += BATCH_SIZE) {
      const batch = group.slice(start, start + BATCH_SIZE);
      const outcome = await postBatch(fetchFn, KINDS[kind], device.token, batch);
      if (outcome.error) {
        summary.ok = false;
        summary.reason = outcome.error;
        if (outcome.error === "unregistered") await outbox.forgetDevice(owner);
        break;
      }
      await outbox._ack(outcome.acked, outcome.rejected);
      if (outcome.rulebookVersion) summary.rulebookVersion = outcome.rulebookVersion;
      summary.sent += outcome.acked.length;
      summary.rejected += outcome.rejected.length;
    }
  }
  summary.waiting = await outbox.count();
  if (summary.ok) await outbox.setMeta("last_sync", new Date().toISOString());
  return summary;
}

async function postBatch(fetchFn, spec, token, batch) {
  let response;
  try {
    response = await fetchFn(spec.url, {
      method: "POST", cache: "no-store", credentials: "omit",
      headers: { "Content-Type": "application/json", "Authorization": `Bearer ${token}`,
                 "X-Clinic-Sync": "1" },
      body: JSON.stringify({ [spec.field]: batch.map((item) => item.payload) }),
    });
  } catch {
    return { error: "unreachable" };
  }
  if (response.status === 401) return { error: "unregistered" };
  if (!response.ok) return { error: "server" };
  const body = await response.json();
  const byId = new Map((body.results || []).map((result) => [result.id, result]));
  const acked = [];
  const rejected = [];
  for (const item of batch) {
    const result = byId.get(item.id);
    if (!result) continue;  // not answered: stays queued for the next attempt
    if (ACKED.has(result.status)) acked.push(item);
    else if (result.status === "rejected") rejected.push({ item, error: result.error });
  }
  return { acked, rejected, rulebookVersion: body.rulebook_version || null };
}

/**
 * Runs syncOnce on demand and on a timer with exponential backoff and jitter while there is
 * something to send. Time functions are injected so the tests drive the clock.
 */
export class SyncScheduler {
  constructor(outbox, { fetchFn, onChange = () => {}, setTimer = (fn, ms) => setTimeout(fn, ms),
                        clearTimer = (id) => clearTimeout(id), random = Math.random } = {}) {
    Object.assign(this, { outbox, fetchFn, onChange, setTimer, clearTimer, random });
    this.delay = BACKOFF_MIN_MS;
    this.timer = null;
    this.running = null;
  }

  /** Start a sync now (or join the one in progress). */
  trigger() {
    if (!this.running) {
      this.running = this._run().finally(() => { this.running = null; });
    }
    return this.running;
  }

  async _run() {
    let summary;
    try {
      summary = await syncOnce(this.outbox, this.fetchFn);
    } catch (error) {
      summary = { ok: false, reason: "error", error: String(error), sent: 0, rejected: 0,
                  waiting: await this.outbox.count() };
    }
    this.delay = summary.ok ? BACKOFF_MIN_MS : Math.min(this.delay * 2, BACKOFF_MAX_MS);
    this._schedule(summary.waiting > 0 ? this.nextDelay(summary.ok) : null);
    this.onChange(summary);
    return summary;
  }

  /** The wait before the next timed attempt: the backoff step plus up to 20 % jitter. */
  nextDelay(ok) {
    const base = ok ? BACKOFF_MIN_MS : this.delay;
    return Math.round(base * (1 + 0.2 * this.random()));
  }

  _schedule(ms) {
    if (this.timer !== null) this.clearTimer(this.timer);
    this.timer = ms === null ? null : this.setTimer(() => { this.timer = null; this.trigger(); }, ms);
  }

  stop() {
    this._schedule(null);
  }
}
