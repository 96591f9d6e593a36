// An SoC entered hours ago is carried forward through the switch history (switch_changes)
// that the server hands over with the state (GET /api/rigs/:rigId/state), not through the
// present switches alone (real PostgreSQL).
import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, test } from "vitest";
import { evaluateRig } from "~/alerts/evaluate.server";
import { rulesWithDefaults } from "~/alerts/rules";
import { alertEpisodes } from "~/db/schema";
import { saveRigRules } from "~/repos/alerts.server";
import { graphFor, toEngineState } from "~/components/now/now-model";
import { carrySocForward } from "~/engine/carry-forward";
import type { RigModel } from "~/engine/model";
import { runProjection } from "~/engine/projection";
import { oneLoadRig } from "~/engine/test-rigs";
import { writeRigStateAndLog } from "~/repos/logged-writes.server";
import { createRig } from "~/repos/rigs.server";
import { historyFromRows } from "~/repos/switch-history.server";
import * as stateRoute from "~/routes/api.rigs.$rigId.state";
import type { RigState, StateChange } from "~/schemas/rig-state";
import { callRoute, makeUser, sessionCookieFor } from "./auth";
import { openTestDb } from "./db";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

/**
 * One 12.8 V × 100 Ah LiFePO4 bank = 1,280 Wh (Peukert exponent 1, no solar, no charger, no
 * BMS standby), a 12.8 W fridge on all day and a 128 W cabin heater. Round numbers so the
 * carried SoC can be worked by hand: 12.8 Wh is 1 % of the bank, 128 Wh is 10 %.
 */
function cabinRig(): RigModel {
  const base = oneLoadRig({ loadW: 12.8 });
  return {
    ...base,
    name: "Juniper test cabin",
    loads: [
      { id: "fridge", name: "Fridge", current: "dc", powerW: 12.8, essential: true },
      { id: "heater", name: "Cabin heater", current: "dc", powerW: 128, essential: false },
    ],
    circuits: [
      ...base.circuits.filter((c) => c.id !== "c2"),
      { id: "c-fridge", name: "Fridge feed", from: { kind: "bus", id: "bus" }, to: { kind: "load", id: "fridge" }, switches: [], criticality: "critical" },
      { id: "c-heater", name: "Heater feed", from: { kind: "bus", id: "bus" }, to: { kind: "load", id: "heater" }, switches: [], criticality: "normal" },
    ],
    modes: [{ id: "m", name: "Parked", loads: [{ loadId: "fridge", hoursPerDay: 24 }, { loadId: "heater", hoursPerDay: 24 }], inverterIdsOn: [], sources: [] }],
  };
}

const H = 3_600_000;

describe("SoC carried forward through the switch history", () => {
  test("80 % entered two hours back, the heater switched on one hour back: 68 % now, not 58 %", async () => {
    const owner = await makeUser(db, "Ada");
    const model = cabinRig();
    const { rig } = await createRig(db, { name: "Juniper test cabin", ownerId: owner.id, document: model });
    const now = Date.now();
    const write = (atMs: number, change: StateChange) => writeRigStateAndLog(db, { rigId: rig.id, userId: owner.id, write: { baseVersion: 0, change }, model, receivedAt: new Date(atMs) });
    await write(now - 3 * H, { kind: "switch", loads: [{ loadId: "heater", on: false }] });
    await write(now - 2 * H, { kind: "soc", soc: { socPct: 80, source: "entered", takenAt: new Date(now - 2 * H).toISOString() } });
    await write(now - 1 * H, { kind: "switch", loads: [{ loadId: "heater", on: true }] });

    const cookie = await sessionCookieFor(db, owner.id);
    const res = await callRoute(stateRoute.loader, { path: `/api/rigs/${rig.id}/state`, cookie, params: { rigId: rig.id } });
    expect(res.status).toBe(200);
    const state = (res.body as { state: RigState }).state;
    // The state at the SoC entry (heater off, from the change three hours back), then the heater on.
    expect(state.history).toEqual([
      { at: new Date(now - 2 * H).toISOString(), loadsOn: ["fridge"] },
      { at: new Date(now - 1 * H).toISOString(), loadsOn: ["fridge", "heater"] },
    ]);

    const carried = (s: RigState) => {
      const engineState = toEngineState(model, s, now);
      return carrySocForward(model, graphFor(model, s.positions), engineState, runProjection).carried[0]!.toSocPct;
    };
    // Worked by hand: first hour the fridge alone, 12.8 W × 1 h = 12.8 Wh = 1 % of 1,280 Wh;
    // second hour fridge and heater, (12.8 + 128) W × 1 h = 140.8 Wh = 11 %. 80 − 1 − 11 = 68 %.
    expect(carried(state)).toBeCloseTo(68, 1);
    // The present state alone (fridge and heater for both hours): 2 × 140.8 Wh = 281.6 Wh = 22 %,
    // 80 − 22 = 58 %. The history changes the answer by the heater's hour, 10 %.
    const { history: _h, ...presentOnly } = state;
    void _h;
    expect(carried(presentOnly)).toBeCloseTo(58, 1);
  });

  test("the alert evaluation carries the SoC through the same history: runway 4.36 h, where the present state alone gave 3.45 h", async () => {
    const owner = await makeUser(db, "Ada");
    const model = cabinRig();
    const { rig } = await createRig(db, { name: "Juniper test cabin", ownerId: owner.id, document: model });
    const now = Date.now();
    const write = (atMs: number, change: StateChange) => writeRigStateAndLog(db, { rigId: rig.id, userId: owner.id, write: { baseVersion: 0, change }, model, receivedAt: new Date(atMs) });
    await write(now - 3 * H, { kind: "switch", loads: [{ loadId: "heater", on: false }] });
    await write(now - 2 * H, { kind: "soc", soc: { socPct: 80, source: "entered", takenAt: new Date(now - 2 * H).toISOString() } });
    await write(now - 1 * H, { kind: "switch", loads: [{ loadId: "heater", on: true }] });
    const rules = rulesWithDefaults(null);
    await saveRigRules(db, rig.id, { ...rules, runway_low: { enabled: true, belowH: 6 } }, owner.id);
    const r = await evaluateRig(db, rig.id, now, { appUrl: "http://tilldawn.test", dawnPlanLine: null });
    expect(r.opened.length).toBeGreaterThan(0);
    const [episode] = await db.select().from(alertEpisodes).where(and(eq(alertEpisodes.rigId, rig.id), eq(alertEpisodes.rule, "runway_low")));
    // Worked by hand: 68 % now (above), floor 20 %: 48 % × 1,280 Wh = 614.4 Wh at 140.8 W = 4.364 h.
    // The present state alone: 80 % − 20 % = 768 Wh at 140.8 W = 5.455 h from the entry, 2 h gone: 3.455 h.
    const runwayH = (episode!.detail as { runwayH: number }).runwayH;
    expect(runwayH).toBeCloseTo(614.4 / 140.8, 1);
    expect(Math.abs(runwayH - (768 / 140.8 - 2))).toBeGreaterThan(0.8);
  });

  test("without a change on record before the window, a load's first change in it is taken as a flip; a mode's change carries its id", () => {
    const t0 = Date.parse("2026-10-14T02:00:00Z");
    const rows = [
      { loadId: "heater", on: true, modeId: null, serverTime: new Date(t0 + H) },
      { loadId: "fridge", on: false, modeId: "m", serverTime: new Date(t0 + 2 * H) },
      { loadId: "heater", on: false, modeId: "m", serverTime: new Date(t0 + 2 * H) },
    ];
    const h = historyFromRows(["fridge"], rows, new Map([["fridge", true]]), t0);
    expect(h).toEqual([
      { at: new Date(t0).toISOString(), loadsOn: ["fridge"] },
      { at: new Date(t0 + H).toISOString(), loadsOn: ["fridge", "heater"] },
      { at: new Date(t0 + 2 * H).toISOString(), loadsOn: [], modeId: "m" },
    ]);
    expect(historyFromRows(["fridge"], [], new Map(), t0)).toEqual([]);
  });
});
