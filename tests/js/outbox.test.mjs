// The outbox (static/js/outbox.js) over an in-memory IndexedDB and a fake clinic server.
import { test } from "node:test";
import assert from "node:assert/strict";
import { IDBFactory } from "fake-indexeddb";

import {
  BACKOFF_MAX_MS, BACKOFF_MIN_MS, BATCH_SIZE, KINDS, openOutbox, probe, registerKind,
  SyncScheduler, syncOnce,
} from "../../static/js/outbox.js";

let dbCounter = 0;
async function freshOutbox() {
  dbCounter += 1;
  return openOutbox(new IDBFactory(), `outbox-test-${dbCounter}`);
}

function json(status, body) {
  return { ok: status >= 200 && status < 300, status, json: async () => body };
}

/** A fake clinic server: answers ping, records uploads, stores each case id once. */
function fakeServer({ reachable = true, status = 200, reject = new Set() } = {}) {
  const server = { reachable, status, stored: new Set(), posts: [], pings: 0 };
  server.fetch = async (url, options = {}) => {
    if (url === "/api/v1/ping") {
      server.pings += 1;
      if (!server.reachable) throw new TypeError("Failed to fetch");
      return json(200, { ok: true });
    }
    if (!server.reachable) throw new TypeError("Failed to fetch");
    const body = JSON.parse(options.body);
    server.posts.push({ url, headers: options.headers, body });
    if (server.status !== 200) return json(server.status, { error: { code: "x" } });
    const field = Object.keys(body)[0];
    return json(200, { results: body[field].map((record) => {
      if (reject.has(record.id)) return { id: record.id, status: "rejected", error: "bad" };
      const status = server.stored.has(record.id) ? "duplicate" : "created";
      server.stored.add(record.id);
      return { id: record.id, status, error: null };
    }) });
  };
  return server;
}

// Ids are unique across owners (the phone makes UUIDs); the owner's initial keeps them apart.
async function queue(outbox, n, owner = "amina") {
  const prefix = owner === "amina" ? "0" : "1";
  for (let i = 0; i < n; i += 1) {
    const id = `${prefix}0000000-0000-4000-8000-${String(i).padStart(12, "0")}`;
    await outbox.add({ kind: "case", id, owner, payload: { id, n: i } });
  }
}

test("it counts what is waiting, per owner and in total", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 3);
  await queue(outbox, 2, "joseph");
  assert.equal(await outbox.count(), 5);
  assert.equal(await outbox.count("amina"), 3);
});

test("adding the same record twice keeps one waiting copy", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 1);
  await queue(outbox, 1);
  assert.equal(await outbox.count(), 1);
});

test("it refuses an unknown kind", async () => {
  const outbox = await freshOutbox();
  assert.throws(() => outbox.add({ kind: "nope", id: "1", owner: "a", payload: {} }));
});

test("it probes the server first and sends nothing when out of reach", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 2);
  await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
  const server = fakeServer({ reachable: false });
  const summary = await syncOnce(outbox, server.fetch);
  assert.deepEqual([summary.ok, summary.reason, summary.waiting], [false, "unreachable", 2]);
  assert.equal(server.pings, 1);
  assert.equal(server.posts.length, 0);
});

test("the service worker's offline answer to the probe counts as out of reach", async () => {
  const fetchFn = async () => json(200, { ok: false, offline: true });
  assert.equal(await probe(fetchFn), false);
});

test("a probe that hangs gives up after its timeout", async () => {
  const fetchFn = (url, { signal }) => new Promise((resolve, reject) => {
    signal.addEventListener("abort", () => reject(new DOMException("aborted", "AbortError")));
  });
  assert.equal(await probe(fetchFn, 20), false);
});

test("it sends with the owner's token and the sync header, then deletes what was acknowledged",
  async () => {
    const outbox = await freshOutbox();
    await queue(outbox, 3);
    await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
    const server = fakeServer();
    const summary = await syncOnce(outbox, server.fetch);
    assert.deepEqual([summary.ok, summary.sent, summary.waiting], [true, 3, 0]);
    const { headers, url, body } = server.posts[0];
    assert.equal(url, "/api/v1/cases");
    assert.equal(headers.Authorization, "Bearer t1");
    assert.equal(headers["X-Clinic-Sync"], "1");
    assert.equal(body.cases.length, 3);
    assert.ok(await outbox.meta("last_sync"));
  });

test("each owner's records go with that owner's own token", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 1, "amina");
  await queue(outbox, 1, "joseph");
  await outbox.setDevice("amina", { device_id: "d1", token: "ta" });
  await outbox.setDevice("joseph", { device_id: "d2", token: "tj" });
  const server = fakeServer();
  await syncOnce(outbox, server.fetch);
  const tokens = server.posts.map((p) => p.headers.Authorization).sort();
  assert.deepEqual(tokens, ["Bearer ta", "Bearer tj"]);
});

test("it sends in batches of BATCH_SIZE", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, BATCH_SIZE + 1);
  await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
  const server = fakeServer();
  await syncOnce(outbox, server.fetch);
  assert.deepEqual(server.posts.map((p) => p.body.cases.length), [BATCH_SIZE, 1]);
});

test("a rejected record leaves the queue for the failed list with its reason", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 2);
  await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
  const bad = "00000000-0000-4000-8000-000000000001";
  const summary = await syncOnce(outbox, fakeServer({ reject: new Set([bad]) }).fetch);
  assert.deepEqual([summary.sent, summary.rejected, summary.waiting], [1, 1, 0]);
  const failed = await outbox.failed();
  assert.deepEqual(failed.map((f) => [f.id, f.error]), [[bad, "bad"]]);
});

test("a refused token keeps the records and forgets the device so it registers again",
  async () => {
    const outbox = await freshOutbox();
    await queue(outbox, 2);
    await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
    const summary = await syncOnce(outbox, fakeServer({ status: 401 }).fetch);
    assert.deepEqual([summary.ok, summary.reason, summary.waiting], [false, "unregistered", 2]);
    assert.equal(await outbox.device("amina"), undefined);
  });

test("records without a registered device wait", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 1);
  const summary = await syncOnce(outbox, fakeServer().fetch);
  assert.deepEqual([summary.ok, summary.reason, summary.waiting], [false, "unregistered", 1]);
});

test("a record the server did not answer for stays queued", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 2);
  await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
  const fetchFn = async (url, options) => {
    if (url === "/api/v1/ping") return json(200, { ok: true });
    const first = JSON.parse(options.body).cases[0];
    return json(200, { results: [{ id: first.id, status: "created" }] });
  };
  const summary = await syncOnce(outbox, fetchFn);
  assert.equal(summary.waiting, 1);
});

test("sending twice after a lost answer creates nothing new on the server", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 2);
  await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
  const server = fakeServer();
  const lostAnswer = async (url, options) => {
    const response = await server.fetch(url, options);
    if (url !== "/api/v1/ping") throw new TypeError("connection dropped");
    return response;
  };
  await syncOnce(outbox, lostAnswer);  // stored on the server, but the phone never heard
  assert.equal(await outbox.count(), 2);
  const summary = await syncOnce(outbox, server.fetch);
  assert.equal(summary.waiting, 0);
  assert.equal(server.stored.size, 2);
});

test("a kind added later posts to its own endpoint", async () => {
  registerKind("outcome", { url: "/api/v1/outcomes", field: "outcomes" });
  try {
    const outbox = await freshOutbox();
    await outbox.add({ kind: "outcome", id: "o1", owner: "amina", payload: { id: "o1" } });
    await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
    const server = fakeServer();
    await syncOnce(outbox, server.fetch);
    assert.equal(server.posts[0].url, "/api/v1/outcomes");
    assert.deepEqual(Object.keys(server.posts[0].body), ["outcomes"]);
  } finally {
    delete KINDS.outcome;
  }
});

test("recent records keep the newest per owner, readable newest first", async () => {
  const outbox = await freshOutbox();
  for (let i = 0; i < 55; i += 1) {
    const stamp = `2026-12-01T10:${String(i).padStart(2, "0")}:00Z`;
    await outbox.remember("amina", { id: `r${i}`, created_at: stamp });
  }
  await outbox.remember("joseph", { id: "j1", created_at: "2026-12-01T11:00:00Z" });
  const mine = await outbox.recent("amina", Infinity);
  assert.equal(mine.length, 50);
  assert.equal(mine[0].id, "r54");
  assert.deepEqual((await outbox.recent("joseph")).map((r) => r.id), ["j1"]);
});

function fakeClock() {
  const timers = [];
  return {
    timers,
    setTimer: (fn, ms) => { timers.push({ fn, ms }); return timers.length; },
    clearTimer: () => {},
  };
}

test("the timer backs off while out of reach, up to its cap, and resets after a success",
  async () => {
    const outbox = await freshOutbox();
    await queue(outbox, 1);
    await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
    const server = fakeServer({ reachable: false });
    const clock = fakeClock();
    const scheduler = new SyncScheduler(outbox, { fetchFn: server.fetch, random: () => 0,
                                                  ...clock });
    const delays = [];
    for (let i = 0; i < 7; i += 1) {
      await scheduler.trigger();
      delays.push(clock.timers.at(-1).ms);
    }
    assert.deepEqual(delays, [60_000, 120_000, 240_000, 480_000, BACKOFF_MAX_MS, BACKOFF_MAX_MS,
                              BACKOFF_MAX_MS]);
    server.reachable = true;
    await scheduler.trigger();
    assert.equal(scheduler.delay, BACKOFF_MIN_MS);
    assert.equal(await outbox.count(), 0);
  });

test("with nothing waiting the timer stops, and the change handler hears the summary",
  async () => {
    const outbox = await freshOutbox();
    const clock = fakeClock();
    const heard = [];
    const scheduler = new SyncScheduler(outbox, { fetchFn: fakeServer().fetch,
                                                  onChange: (s) => heard.push(s), ...clock });
    await scheduler.trigger();
    assert.equal(scheduler.timer, null);
    assert.equal(heard[0].waiting, 0);
  });

test("two triggers at once share one sync", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 1);
  await outbox.setDevice("amina", { device_id: "d1", token: "t1" });
  const server = fakeServer();
  const scheduler = new SyncScheduler(outbox, { fetchFn: server.fetch, ...fakeClock() });
  await Promise.all([scheduler.trigger(), scheduler.trigger()]);
  assert.equal(server.posts.length, 1);
});

test("a sync reports the rulebook version the server has in force", async () => {
  const outbox = await freshOutbox();
  await queue(outbox, 1);
  await outbox.setDevice("amina", { device_id: "d", token: "t" });
  const server = fakeServer();
  const original = server.fetch;
  server.fetch = async (url, options) => {
    const response = await original(url, options);
    if (url === "/api/v1/ping") return response;
    const body = await response.json();
    return json(200, { ...body, rulebook_version: "v2" });
  };
  const summary = await syncOnce(outbox, server.fetch);
  assert.equal(summary.sent, 1);
  assert.equal(summary.rulebookVersion, "v2");
});
