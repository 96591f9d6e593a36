// The shared rig state API (Now screen) against the real PostgreSQL: roles, validation, conflicts.
import { afterAll, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import { openTestDb, testDatabaseUrl } from "./db";
import type { Call } from "./juniper-people";

process.env.DATABASE_URL ??= testDatabaseUrl;

const { db, pool } = openTestDb();
afterAll(() => pool.end());

const { switchChanges, rigState } = await import("~/db/schema");
const { getAsBuilt } = await import("~/repos/rigs.server");
const { writeRigState, getRigState } = await import("~/repos/rig-state.server");
const stateRoute = await import("~/routes/api.rigs.$rigId.state");
const modesRoute = await import("~/routes/api.rigs.$rigId.modes");
const modelRoute = await import("~/routes/api.rigs.$rigId.model");
const { juniperModel } = await import("../fixtures/juniper");

const { juniperWithPeople, request, run } = await import("./juniper-people");
const juniper = () => juniperWithPeople(db);

const getState = (rigId: string, cookie?: string) => run(stateRoute.loader, request(`/api/rigs/${rigId}/state`, "GET", { ...(cookie ? { cookie } : {}) }), rigId);
const postState = (rigId: string, call: Call) => run(stateRoute.action, request(`/api/rigs/${rigId}/state`, "POST", call), rigId);
const postModes = (rigId: string, call: Call) => run(modesRoute.action, request(`/api/rigs/${rigId}/modes`, "POST", call), rigId);

const switchFridge = (on: boolean, baseVersion = 0) => ({ baseVersion, change: { kind: "switch", loads: [{ loadId: "fridge", on }] } });

describe("Shared rig state: who may read and write", () => {
  test("every member reads the model and state; a stranger gets 404 and a signed-out caller 401", async () => {
    const j = await juniper();
    for (const who of [j.ada, j.sam, j.noor]) {
      const res = await getState(j.rig.id, who.cookie);
      expect(res.status).toBe(200);
      const body = await res.json();
      expect(body.state).toMatchObject({ rigId: j.rig.id, version: 0, switches: {}, soc: null, place: { kind: "home" } });
    }
    const model = await run(modelRoute.loader, request(`/api/rigs/${j.rig.id}/model`, "GET", { cookie: j.noor.cookie }), j.rig.id);
    expect(model.status).toBe(200);
    expect(await model.json()).toMatchObject({ revision: 1, role: "guest", model: { name: "Juniper" } });
    expect((await getState(j.rig.id, j.stranger.cookie)).status).toBe(404);
    expect((await getState(j.rig.id)).status).toBe(401);
    expect((await getState("not-a-uuid", j.ada.cookie)).status).toBe(404);
  });

  test("crew and owners switch loads; a guest is refused with 403 and nothing changes", async () => {
    const j = await juniper();
    const crew = await postState(j.rig.id, { cookie: j.sam.cookie, body: switchFridge(false) });
    expect(crew.status).toBe(200);
    const result = await crew.json();
    expect(result.superseded).toBe(false);
    expect(result.state).toMatchObject({ version: 1, switches: { fridge: false } });
    expect(result.state.fieldTimes["load:fridge"]).toMatchObject({ by: j.sam.id, byName: "Sam" });

    const owner = await postState(j.rig.id, { cookie: j.ada.cookie, body: switchFridge(true, 1) });
    expect(owner.status).toBe(200);

    const guest = await postState(j.rig.id, { cookie: j.noor.cookie, body: switchFridge(false, 2) });
    expect(guest.status).toBe(403);
    expect((await guest.json()).error.code).toBe("forbidden");
    expect((await getRigState(db, j.rig.id)).switches).toEqual({ fridge: true });

    const history = await db.select().from(switchChanges).where(eq(switchChanges.rigId, j.rig.id));
    expect(history.map((h) => [h.loadId, h.on, h.authorId])).toEqual([
      ["fridge", false, j.sam.id],
      ["fridge", true, j.ada.id],
    ]);
  });

  test("a POST from another site is refused with 403", async () => {
    const j = await juniper();
    const res = await postState(j.rig.id, { cookie: j.ada.cookie, body: switchFridge(false), headers: { origin: "https://evil.example", "sec-fetch-site": "cross-site" } });
    expect(res.status).toBe(403);
    expect((await getRigState(db, j.rig.id)).version).toBe(0);
  });
});

describe("Shared rig state: bad input is answered with a clear 4xx and nothing is lost", () => {
  test("malformed JSON, a wrong content type, an unknown load, an SoC above 100 % and a future reading are each refused with a 4xx", async () => {
    const j = await juniper();
    await postState(j.rig.id, { cookie: j.sam.cookie, body: switchFridge(false) });
    const cases: Array<[Call, number, string]> = [
      [{ raw: "{not json" }, 400, "invalid_json"],
      [{ raw: "x", headers: { "content-type": "text/plain" } }, 415, "unsupported_media_type"],
      [{ body: { baseVersion: 1, change: { kind: "switch", loads: [{ loadId: "kettle", on: true }] } } }, 400, "invalid_change"],
      [{ body: { baseVersion: 1, change: { kind: "soc", soc: { socPct: 140, source: "entered", takenAt: new Date().toISOString() } } } }, 400, "invalid_change"],
      [{ body: { baseVersion: 1, change: { kind: "soc", soc: { socPct: 60, source: "entered", takenAt: new Date(Date.now() + 86_400_000).toISOString() } } } }, 400, "invalid_change"],
      [{ body: { baseVersion: 1, change: { kind: "mode", modeId: "holiday" } } }, 400, "invalid_change"],
      [{ body: { baseVersion: 1, change: { kind: "place", place: { kind: "typed", latDeg: 95, lonDeg: 0 } } } }, 400, "invalid_change"],
      [{ body: { change: { kind: "switch", loads: [] } } }, 400, "invalid_change"],
    ];
    for (const [call, status, code] of cases) {
      const res = await postState(j.rig.id, { cookie: j.sam.cookie, ...call });
      expect(res.status, JSON.stringify(call)).toBe(status);
      const body = await res.json();
      expect(body.error.code).toBe(code);
      expect(body.error.message).toEqual(expect.any(String));
    }
    const soc = await (await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 1, change: { kind: "soc", soc: { socPct: 140, source: "entered", takenAt: new Date().toISOString() } } } })).json();
    expect(soc.error.issues[0].path).toEqual(["change", "soc", "socPct"]);
    const after = await getRigState(db, j.rig.id);
    expect(after).toMatchObject({ version: 1, switches: { fridge: false }, soc: null });
  });
});

describe("Shared rig state: two people switching at once", () => {
  test("the later write by server time wins even when it commits first; the loser's answer says superseded", async () => {
    const j = await juniper();
    const t0 = Date.now();
    // Ada's request reached the server later (t0 + 50 ms) but its transaction committed first.
    const later = await writeRigState(db, { rigId: j.rig.id, userId: j.ada.id, model: juniperModel, write: switchFridge(true) as never, receivedAt: new Date(t0 + 50) });
    const earlier = await writeRigState(db, { rigId: j.rig.id, userId: j.sam.id, model: juniperModel, write: switchFridge(false) as never, receivedAt: new Date(t0) });
    expect(later.superseded).toBe(false);
    expect(earlier.superseded).toBe(true);
    expect(earlier.lostFields).toEqual([expect.objectContaining({ field: "load:fridge", by: j.ada.id, byName: "Ada" })]);
    expect(earlier.state.switches).toEqual({ fridge: true });
    expect(earlier.state.version).toBe(1);
    // The lost switch is kept in the history, marked not applied.
    const history = await db.select().from(switchChanges).where(eq(switchChanges.rigId, j.rig.id));
    expect(history.find((h) => h.authorId === j.sam.id)?.applied).toBe(false);
  });

  test("different loads switched at once both apply; a write on a stale version reports whose change it replaced", async () => {
    const j = await juniper();
    const [a, b] = await Promise.all([
      postState(j.rig.id, { cookie: j.ada.cookie, body: { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "lights", on: false }] } } }),
      postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "roof-fan", on: false }] } } }),
    ]);
    expect([a.status, b.status]).toEqual([200, 200]);
    const state = await getRigState(db, j.rig.id);
    expect(state.switches).toEqual({ lights: false, "roof-fan": false });
    expect(state.version).toBe(2);

    // Sam, still on version 0, switches the lights back on: it applies, and says it replaced Ada's change.
    const res = await (await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "lights", on: true }] } } })).json();
    expect(res.superseded).toBe(false);
    expect(res.replaced).toEqual([expect.objectContaining({ field: "load:lights", byName: "Ada" })]);
    expect(res.state.switches.lights).toBe(true);
  });

  test("racing the same load through the API: both answers are 200 and the stored value is the last one by server time", async () => {
    const j = await juniper();
    const answers = await Promise.all(
      [true, false, true, false].map((on, i) =>
        postState(j.rig.id, { cookie: i % 2 ? j.sam.cookie : j.ada.cookie, body: switchFridge(on) }).then((r) => r.json()),
      ),
    );
    const row = (await db.select().from(rigState).where(eq(rigState.rigId, j.rig.id)))[0]!;
    const last = (row.fieldTimes as Record<string, { at: string; by: string }>)["load:fridge"]!;
    const history = await db.select().from(switchChanges).where(eq(switchChanges.rigId, j.rig.id));
    const newest = history.filter((h) => h.applied).sort((x, y) => +x.serverTime - +y.serverTime || x.id - y.id).at(-1)!;
    expect(row.switches.fridge).toBe(newest.on);
    expect(newest.serverTime.toISOString()).toBe(last.at);
    expect(answers.every((a) => a.state && typeof a.superseded === "boolean")).toBe(true);
  });
});

describe("Modes and the SoC entry", () => {
  test("applying a mode clears per-load switches and records the loads it switched", async () => {
    const j = await juniper();
    await postState(j.rig.id, { cookie: j.sam.cookie, body: switchFridge(false) });
    const res = await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 1, change: { kind: "mode", modeId: "storage" } } });
    expect(res.status).toBe(200);
    const { state } = await res.json();
    expect(state).toMatchObject({ modeId: "storage", switches: {}, version: 2 });
    const history = await db.select().from(switchChanges).where(eq(switchChanges.rigId, j.rig.id));
    const fromMode = history.filter((h) => h.modeId === "storage");
    // Parked night (the default) had eight loads on besides the fridge (already off); storage keeps only the alarm.
    expect(fromMode.map((h) => h.loadId).sort()).toEqual(["heater-fan", "hob", "laptop", "lights", "roof-fan", "sat-dish", "water-pump"]);
    expect(fromMode.every((h) => h.on === false)).toBe(true);
  });

  test("a resting-voltage entry is stored with its voltage and the time it was read", async () => {
    const j = await juniper();
    const takenAt = new Date(Date.now() - 2 * 3_600_000).toISOString();
    const res = await postState(j.rig.id, {
      cookie: j.sam.cookie,
      body: { baseVersion: 0, change: { kind: "soc", soc: { socPct: 55, source: "resting_voltage", restingV: 13.2, takenAt } } },
    });
    expect(res.status).toBe(200);
    expect((await res.json()).state.soc).toEqual({ socPct: 55, source: "resting_voltage", restingV: 13.2, takenAt });
    const noVoltage = await postState(j.rig.id, {
      cookie: j.sam.cookie,
      body: { baseVersion: 1, change: { kind: "soc", soc: { socPct: 55, source: "resting_voltage", takenAt } } },
    });
    expect(noVoltage.status).toBe(400);
  });

  test("owners save a new mode as a new revision; crew get 403; a stale revision gets 409", async () => {
    const j = await juniper();
    const body = { op: "create", expectedRevision: 1, name: "Quiet evening", loads: [{ loadId: "fridge", hoursPerDay: 24 }, { loadId: "lights", hoursPerDay: 3 }] };
    expect((await postModes(j.rig.id, { cookie: j.sam.cookie, body })).status).toBe(403);
    const res = await postModes(j.rig.id, { cookie: j.ada.cookie, body });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ revision: 2, modeId: "quiet-evening" });
    const asBuilt = await getAsBuilt(db, j.rig.id);
    expect((asBuilt?.document as typeof juniperModel).modes.map((m) => m.name)).toContain("Quiet evening");

    const stale = await postModes(j.rig.id, { cookie: j.ada.cookie, body });
    expect(stale.status).toBe(409);
    expect(await stale.json()).toMatchObject({ error: { code: "stale_revision" }, revision: 2 });

    const hours = await postModes(j.rig.id, { cookie: j.ada.cookie, body: { op: "hours", expectedRevision: 2, modeId: "parked-night", loads: [{ loadId: "lights", hoursPerDay: 2 }] } });
    expect(hours.status).toBe(200);
    const bad = await postModes(j.rig.id, { cookie: j.ada.cookie, body: { op: "hours", expectedRevision: 3, modeId: "parked-night", loads: [{ loadId: "lights", hoursPerDay: 30 }] } });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.message).toMatch(/between 0 and 24/);
    const unknownLoad = await postModes(j.rig.id, { cookie: j.ada.cookie, body: { ...body, expectedRevision: 3, name: "Odd", loads: [{ loadId: "kettle", hoursPerDay: 1 }] } });
    expect(unknownLoad.status).toBe(400);
    expect((await getAsBuilt(db, j.rig.id))?.revision).toBe(3);
  });
});

describe("Shared rig state reaches phones that sync", () => {
  test("a switch made on the Now screen is in the rig's change log, so another phone's next sync reads the state again", async () => {
    const j = await juniper();
    const { applySync } = await import("~/repos/sync.server");
    // Ada's phone has synced up to now.
    const before = await applySync(db, { userId: j.ada.id, role: "owner" }, { rigId: j.rig.id, cursor: null, changes: [] });
    expect(before.changes).toEqual([]);

    expect((await postState(j.rig.id, { cookie: j.sam.cookie, body: switchFridge(false) })).status).toBe(200);

    const after = await applySync(db, { userId: j.ada.id, role: "owner" }, { rigId: j.rig.id, cursor: before.cursor, changes: [] });
    expect(after.changes).toEqual([expect.objectContaining({ kind: "state" })]);
    expect(after.cursor).toBeGreaterThan(before.cursor ?? 0);
  });
});
