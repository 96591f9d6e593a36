import "fake-indexeddb/auto";
import { afterEach, beforeEach, describe, expect, test } from "vitest";
import { TilldawnDb } from "./db.client";
import { addReadings, countOutbox, editReading, enqueue } from "./outbox.client";
import { backoffDelay, SyncRunner, pruneReadings } from "./sync.client";
import type { Change, ChangeResult, PulledChange, SyncResponse, WireReading } from "./protocol";

const RIG = "3f1d2c4b-5a69-4e7f-8a1b-2c3d4e5f6a7b";
const ME = "8d7c6b5a-4f3e-4d2c-9b1a-0f9e8d7c6b5a";

/** An in-memory stand-in for POST /api/sync with the same idempotency rule. */
class FakeServer {
  applied = new Map<string, Change>();
  requests: Array<{ cursor: number | null; ids: string[] }> = [];
  others: PulledChange[] = [];
  refuse = new Set<string>();
  /** Next answers to give instead of a normal one: a status code, or "drop" (applied, then the connection dies). */
  script: Array<number | "drop"> = [];
  inFlight = 0;
  maxInFlight = 0;

  fetch = async (_url: RequestInfo | URL, init?: RequestInit): Promise<Response> => {
    this.inFlight++;
    this.maxInFlight = Math.max(this.maxInFlight, this.inFlight);
    try {
      await new Promise((r) => setTimeout(r, 1));
      const body = JSON.parse(String(init?.body)) as { cursor: number | null; changes: Change[] };
      this.requests.push({ cursor: body.cursor, ids: body.changes.map((c) => c.id) });
      const next = this.script.shift();
      if (typeof next === "number") return new Response(JSON.stringify({ error: { code: "x", message: "no" } }), { status: next });
      const results: ChangeResult[] = body.changes.map((c) => {
        if (this.refuse.has(c.id)) return { id: c.id, status: "refused", reason: "read_only", message: "Guests follow this rig read-only." };
        if (this.applied.has(c.id)) return { id: c.id, status: "duplicate" };
        this.applied.set(c.id, c);
        return { id: c.id, status: "applied" };
      });
      if (next === "drop") throw new TypeError("Failed to fetch");
      const from = body.cursor ?? 0;
      const changes = this.others.filter((c) => c.cursor > from);
      const answer: SyncResponse = {
        me: { userId: ME, role: "crew" },
        results,
        changes,
        cursor: Math.max(from, ...changes.map((c) => c.cursor)),
        more: false,
        serverTime: new Date().toISOString(),
      };
      return Response.json(answer);
    } finally {
      this.inFlight--;
    }
  };
}

const reading = (i: number) => ({ takenAt: new Date(Date.UTC(2025, 9, 12, 2, i)).toISOString(), bankVoltageV: 13.2 - i / 100, currentA: -3.5, socPct: 80 - i });

let db: TilldawnDb;
let server: FakeServer;
let online: boolean;
let now: number;

function runner(extra: Partial<ConstructorParameters<typeof SyncRunner>[0]> = {}) {
  return new SyncRunner({
    db,
    fetch: server.fetch as typeof fetch,
    isOnline: () => online,
    now: () => now,
    random: () => 1,
    setTimeout: () => 0,
    clearTimeout: () => {},
    batchSize: 3,
    ...extra,
  });
}

beforeEach(async () => {
  db = new TilldawnDb(`test-${crypto.randomUUID()}`);
  await db.rigs.put({ id: RIG, name: "Juniper", role: "crew", userId: ME, seenAt: 0 });
  server = new FakeServer();
  online = true;
  now = Date.UTC(2025, 9, 12, 12);
});
afterEach(async () => {
  await db.delete();
});

describe("Outbox and sync runner", () => {
  test("changes are sent oldest first, in batches, and leave the outbox once acknowledged", async () => {
    const ids = await addReadings(db, RIG, Array.from({ length: 7 }, (_, i) => reading(i)), ME);
    const outbox = await db.outbox.orderBy("seq").toArray();
    const sync = runner();
    await sync.syncNow();
    expect(server.requests.map((r) => r.ids.length)).toEqual([3, 3, 1]);
    expect(server.requests.flatMap((r) => r.ids)).toEqual(outbox.map((e) => e.id));
    expect(await countOutbox(db)).toEqual({ waiting: 0, refused: 0 });
    expect((await db.readings.bulkGet(ids)).every((r) => r?.sync === "synced")).toBe(true);
    expect(sync.getStatus()).toMatchObject({ state: "idle", waiting: 0, lastSyncedAt: now });
  });

  test("a crash between send and acknowledge: the batch is sent again, the server answers duplicate, nothing is doubled", async () => {
    await addReadings(db, RIG, [reading(1), reading(2)], ME);
    server.script = ["drop"];
    const sync = runner();
    await sync.syncNow();
    expect(sync.getStatus().state).toBe("error");
    expect(await countOutbox(db)).toEqual({ waiting: 2, refused: 0 });
    expect(server.applied.size).toBe(2);

    // The phone restarts: a new runner over the same store.
    const again = runner();
    await again.syncNow();
    expect(server.requests).toHaveLength(2);
    expect(server.requests[1]!.ids).toEqual(server.requests[0]!.ids);
    expect(server.applied.size).toBe(2);
    expect(await countOutbox(db)).toEqual({ waiting: 0, refused: 0 });
    expect(again.getStatus().state).toBe("idle");
  });

  test("a refused change stays in the outbox, marked with the reason, and its reading shows it", async () => {
    const [ok, bad] = await addReadings(db, RIG, [reading(1), reading(2)], ME);
    const badEntry = await db.outbox.where("entityId").equals(bad!).first();
    server.refuse.add(badEntry!.id);
    const sync = runner();
    await sync.syncNow();
    expect(await countOutbox(db)).toEqual({ waiting: 0, refused: 1 });
    expect(await db.outbox.get(badEntry!.seq!)).toMatchObject({ state: "refused", reason: "read_only" });
    expect(await db.readings.get(bad!)).toMatchObject({ sync: "refused", refusal: "Guests follow this rig read-only." });
    expect(await db.readings.get(ok!)).toMatchObject({ sync: "synced" });
    // A refused change is not sent again.
    await sync.syncNow();
    expect(server.requests.at(-1)!.ids).toEqual([]);
  });

  test("failures back off exponentially up to a cap, and a success resets the wait", async () => {
    await addReadings(db, RIG, [reading(1)], ME);
    const timers: number[] = [];
    const sync = runner({ setTimeout: (_fn, ms) => timers.push(ms), backoffBaseMs: 1000, backoffMaxMs: 8000, periodMs: 1e9, debounceMs: 1 });
    server.script = [500, 500, 503, 500, 500];
    for (let i = 0; i < 5; i++) await sync.syncNow();
    expect(timers).toEqual([1000, 2000, 4000, 8000, 8000]);
    expect(sync.getStatus()).toMatchObject({ state: "error", error: { code: "server" }, retryAt: now + 8000, waiting: 1 });
    // While waiting out a backoff, a local change does not cut the wait short.
    sync.request("change");
    expect(timers).toHaveLength(5);
    await sync.syncNow();
    expect(sync.getStatus()).toMatchObject({ state: "idle", error: null, waiting: 0 });
    server.script = [500];
    await addReadings(db, RIG, [reading(2)], ME);
    await sync.syncNow();
    expect(timers.at(-1)).toBe(1000);
  });

  test("the jittered delay stays between half and all of the exponential step", () => {
    expect(backoffDelay(1, 2000, 300_000, 0)).toBe(1000);
    expect(backoffDelay(1, 2000, 300_000, 1)).toBe(2000);
    expect(backoffDelay(4, 2000, 300_000, 1)).toBe(16_000);
    expect(backoffDelay(30, 2000, 300_000, 0.5)).toBe(225_000);
  });

  test("an expired session keeps the outbox and asks to sign in again, without a retry loop", async () => {
    await addReadings(db, RIG, [reading(1)], ME);
    const timers: number[] = [];
    const sync = runner({ setTimeout: (_fn, ms) => timers.push(ms) });
    server.script = [401];
    await sync.syncNow();
    expect(sync.getStatus()).toMatchObject({ state: "error", error: { code: "auth" }, waiting: 1, retryAt: null });
    expect(timers).toEqual([]);
    expect(await countOutbox(db)).toEqual({ waiting: 1, refused: 0 });
  });

  test("offline: nothing is sent and the state says so; the changes wait", async () => {
    await addReadings(db, RIG, [reading(1), reading(2), reading(3)], ME);
    online = false;
    const sync = runner();
    await sync.syncNow();
    expect(server.requests).toEqual([]);
    expect(sync.getStatus()).toMatchObject({ state: "offline", waiting: 3 });
    online = true;
    await sync.syncNow();
    expect(sync.getStatus()).toMatchObject({ state: "idle", waiting: 0 });
  });

  test("only one sync runs at a time; a request during a sync runs once more after it", async () => {
    await addReadings(db, RIG, [reading(1)], ME);
    const sync = runner({ batchSize: 1 });
    const first = sync.syncNow();
    await addReadings(db, RIG, [reading(2)], ME);
    const second = sync.syncNow();
    await Promise.all([first, second]);
    expect(server.maxInFlight).toBe(1);
    expect(server.applied.size).toBe(2);
  });

  test("readings from others are applied; a reading with our own edit still waiting keeps our version; deletions are removed", async () => {
    const [mine] = await addReadings(db, RIG, [reading(1)], ME);
    const sync = runner();
    await sync.syncNow();
    await editReading(db, RIG, mine!, { note: "fridge just cycled" });
    const wire = (id: string, extra: Partial<WireReading> = {}): WireReading => ({
      id, rigId: RIG, authorId: "someone", takenAt: new Date(now - 3600_000).toISOString(), bankVoltageV: 13.1, currentA: -2, socPct: 70,
      temperatureC: null, solarWhToday: null, note: "", source: "hand", updatedAt: new Date(now).toISOString(), deletedAt: null, ...extra,
    });
    const theirs = crypto.randomUUID();
    const gone = crypto.randomUUID();
    await db.readings.put({ ...(await db.readings.get(mine!))!, id: gone, sync: "synced" });
    server.others = [
      { cursor: 10, kind: "reading", reading: wire(theirs) },
      { cursor: 11, kind: "reading", reading: wire(mine!, { note: "server copy" }) },
      { cursor: 12, kind: "reading", reading: wire(gone, { deletedAt: new Date(now).toISOString() }) },
    ];
    // This answer carries no result for our edit (as if cut short): the edit keeps waiting.
    const pullOnly = runner({
      fetch: (async (url: RequestInfo | URL, init?: RequestInit) => {
        const body = (await (await server.fetch(url, init)).json()) as SyncResponse;
        return Response.json({ ...body, results: [] });
      }) as typeof fetch,
    });
    await pullOnly.syncNow();
    expect(await countOutbox(db)).toEqual({ waiting: 1, refused: 0 });
    expect(await db.readings.get(theirs)).toMatchObject({ sync: "synced", authorId: "someone" });
    expect((await db.readings.get(mine!))!.note).toBe("fridge just cycled");
    expect(await db.readings.get(gone)).toBeUndefined();
    expect(await db.meta.get(`cursor:${RIG}`)).toEqual({ key: `cursor:${RIG}`, value: 12 });
  });

  test("state writes queue like readings, and a superseded switch change is told to the person", async () => {
    await enqueue(db, RIG, "state.write", { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "fridge", on: false }] } }, "state");
    const sync = runner({
      fetch: (async (url: RequestInfo | URL, init?: RequestInit) => {
        const res = await server.fetch(url, init);
        const body = (await res.json()) as SyncResponse;
        body.results = body.results.map((r) => ({ id: r.id, status: "applied", detail: { superseded: true } }));
        return Response.json(body);
      }) as typeof fetch,
    });
    await sync.syncNow();
    expect(sync.getStatus().notices).toHaveLength(1);
    expect(await countOutbox(db)).toEqual({ waiting: 0, refused: 0 });
  });

  test("the phone keeps a window of days: synced readings older than it are pruned, waiting ones stay", async () => {
    const old = Date.UTC(2025, 0, 1);
    const [waiting] = await addReadings(db, RIG, [{ ...reading(0), takenAt: new Date(old).toISOString() }], ME);
    await db.readings.bulkPut([
      { id: "a", rigId: RIG, authorId: ME, takenAt: old, bankVoltageV: 13, currentA: null, socPct: null, temperatureC: null, solarWhToday: null, note: "", source: "hand", updatedAt: old, sync: "synced" },
      { id: "b", rigId: RIG, authorId: ME, takenAt: now, bankVoltageV: 13, currentA: null, socPct: null, temperatureC: null, solarWhToday: null, note: "", source: "hand", updatedAt: now, sync: "synced" },
    ]);
    await pruneReadings(db, RIG, now - 90 * 86_400_000);
    expect((await db.readings.toArray()).map((r) => r.id).sort()).toEqual([waiting!, "b"].sort());
  });
});
