// SoC entries for every bank through POST /api/rigs/:rigId/state (real PostgreSQL).
import { afterAll, describe, expect, test } from "vitest";
import { openTestDb, testDatabaseUrl } from "./db";
import type { Call } from "./juniper-people";

process.env.DATABASE_URL ??= testDatabaseUrl;

const { db, pool } = openTestDb();
afterAll(() => pool.end());

const stateRoute = await import("~/routes/api.rigs.$rigId.state");
const { juniperModel } = await import("../fixtures/juniper");

const { juniperWithPeople, request, run } = await import("./juniper-people");
const juniper = () => juniperWithPeople(db);

const getState = (rigId: string, cookie: string) => run(stateRoute.loader, request(`/api/rigs/${rigId}/state`, "GET", { cookie }), rigId);
const postState = (rigId: string, call: Call) => run(stateRoute.action, request(`/api/rigs/${rigId}/state`, "POST", call), rigId);

describe("SoC for every bank", () => {
  test("crew enter the starter battery's SoC; the house bank's stays; an unknown bank is a 400", async () => {
    const j = await juniper();
    const takenAt = new Date(Date.now() - 60_000).toISOString();
    const house = await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 0, change: { kind: "soc", soc: { socPct: 64, source: "entered", takenAt } } } });
    expect(house.status).toBe(200);
    const starter = await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 1, change: { kind: "soc", bankId: "starter", soc: { socPct: 88, source: "entered", takenAt } } } });
    expect(starter.status).toBe(200);
    const body = (await starter.json()) as { state: { soc: { socPct: number }; bankSocs?: Record<string, { socPct: number }> } };
    expect(body.state.soc.socPct).toBe(64);
    expect(body.state.bankSocs?.starter?.socPct).toBe(88);
    const bad = await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 2, change: { kind: "soc", bankId: "nowhere", soc: { socPct: 50, source: "entered", takenAt } } } });
    expect(bad.status).toBe(400);
  });
});

describe("every switch has a position in the state", () => {
  test("GET answers each switch's position and where it came from", async () => {
    const j = await juniper();
    await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "laptop", on: true }], positions: [{ switchId: "sw-cab", position: "off" }] } } });
    const res = await getState(j.rig.id, j.noor.cookie);
    const body = (await res.json()) as { switchPositions: { switchId: string; position: string; origin: string }[] };
    expect(body.switchPositions).toHaveLength(juniperModel.switches.length);
    // The changeover set to "off" is off (and conducts nowhere); the enable follows the fridge.
    expect(body.switchPositions.find((p) => p.switchId === "sw-cab")).toMatchObject({ position: "off", origin: "set" });
    expect(body.switchPositions.find((p) => p.switchId === "sw-bank-enable")).toMatchObject({ position: "on", origin: "follows-loads" });
  });
});
