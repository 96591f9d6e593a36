// Property tests of the version-2 solution, the dawn plan and the shared-bus split.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { larkspurModel } from "../../tests/fixtures/larkspur";
import { buildCircuitGraph } from "./circuit-graph";
import { planForDawn } from "./dawn-plan";
import { computeBudget } from "./draw";
import type { RigModel } from "./model";
import { runProjection } from "./projection";
import { solveState } from "./solution";

const night = "2026-10-15T20:00:00-06:00";
const runs = { numRuns: 25 };

describe("properties of the electrical solution", () => {
  it("a load never gains protection by moving to a bus with no protected path", () => {
    fc.assert(fc.property(fc.constantFrom(...larkspurModel.loads.map((l) => l.id)), fc.constantFrom("load", "charge"), (loadId, side) => {
      const moved: RigModel = { ...larkspurModel, circuits: larkspurModel.circuits.map((c) => (c.to.kind === "load" && c.to.id === loadId ? { ...c, from: { kind: "bus", id: "charge-bus" } } : c)) };
      const sol = solveState(moved, buildCircuitGraph(moved, { "sw-crit": side }), { modeId: "camp" });
      expect(sol.loads[loadId]!.lowVoltageProtected).toBe(false);
    }), runs);
  });

  it("energy balances across banks: what the banks give equals what the loads take, when no source runs", () => {
    fc.assert(fc.property(fc.double({ min: 20, max: 100, noNaN: true }), fc.double({ min: 20, max: 100, noNaN: true }), fc.double({ min: 0.2, max: 3, noNaN: true }), fc.constantFrom("load", "charge"), (socA, socB, scale, side) => {
      const m: RigModel = { ...larkspurModel, loads: larkspurModel.loads.map((l) => ({ ...l, powerW: (l.powerW ?? 0) * scale })) };
      const g = buildCircuitGraph(m, { "sw-crit": side });
      const p = runProjection(m, g, { dateTime: night, modeId: "camp", banks: [{ bankId: "bat-a", socPct: socA }, { bankId: "bat-b", socPct: socB }, { bankId: "agm", socPct: 90 }], weatherFactor: 0, switchPositions: { "sw-crit": side } }, { horizonH: 12 });
      const load = p.banks.reduce((s, b) => s + b.energy.loadWh, 0);
      const served = p.banks.reduce((s, b) => s + b.energy.drawnWh + b.energy.unmetWh, 0);
      expect(served).toBeCloseTo(load, 6);
      // The draw the banks carry is the budget's day scaled to the horizon, split without loss.
      const budget = computeBudget(m, g, { modeId: "camp" });
      expect(budget.banks.reduce((s, b) => s + b.whPerDay, 0)).toBeCloseTo(budget.totalWhPerDay, 6);
    }), runs);
  });

  it("paralleling a second identical battery never shortens the runway", () => {
    fc.assert(fc.property(fc.double({ min: 15, max: 100, noNaN: true }), fc.double({ min: 0.2, max: 4, noNaN: true }), (soc, scale) => {
      const m: RigModel = { ...larkspurModel, loads: larkspurModel.loads.map((l) => ({ ...l, powerW: (l.powerW ?? 0) * scale })) };
      const single: RigModel = { ...m, circuits: m.circuits.filter((c) => c.id !== "c-b-load") };
      const state = { dateTime: night, modeId: "camp", banks: [{ bankId: "bat-a", socPct: soc }, { bankId: "bat-b", socPct: soc }, { bankId: "agm", socPct: 90 }], weatherFactor: 0.3, switchPositions: { "sw-crit": "load" } };
      const two = runProjection(m, buildCircuitGraph(m, { "sw-crit": "load" }), state, { stepMin: 15 }).banks.find((b) => b.bankId === "bat-a")!.runwayH;
      const one = runProjection(single, buildCircuitGraph(single, { "sw-crit": "load" }), state, { stepMin: 15 }).banks.find((b) => b.bankId === "bat-a")!.runwayH;
      expect(two ?? Infinity).toBeGreaterThanOrEqual((one ?? Infinity) - 1e-9);
    }), runs);
  });

  it("the dawn plan, when it finds a plan, makes the verdict pass", () => {
    const g = buildCircuitGraph(juniperModel);
    fc.assert(fc.property(fc.double({ min: 15, max: 60, noNaN: true }), fc.integer({ min: 0, max: 10 }), fc.double({ min: 0.2, max: 1, noNaN: true }), (soc, margin, weather) => {
      const state = { dateTime: "2026-10-15T19:30:00-06:00", modeId: "parked-night", banks: [{ bankId: "house", socPct: soc }], weatherFactor: weather };
      const plan = planForDawn(juniperModel, g, state, { marginSocPct: margin });
      if (!plan.needed || !plan.found) return;
      // Apply it independently: the "off" loads out of loadsOn, the "halve" loads at half hours.
      const halve = new Set(plan.actions.filter((a) => a.kind === "halve").map((a) => a.loadId));
      const invOff = new Set(plan.invertersOff);
      const off = new Set([...plan.switchOff, ...(invOff.size ? juniperModel.loads.filter((l) => l.current === "ac").map((l) => l.id) : [])]);
      const mode = juniperModel.modes.find((x) => x.id === "parked-night")!;
      const m: RigModel = { ...juniperModel, modes: juniperModel.modes.map((x) => (x.id !== mode.id ? x : { ...x, loads: x.loads.map((l) => (halve.has(l.loadId) ? { ...l, hoursPerDay: l.hoursPerDay / 2 } : l)) })) };
      const loadsOn = mode.loads.filter((l) => l.hoursPerDay > 0 && !off.has(l.loadId)).map((l) => l.loadId);
      const p = runProjection(m, buildCircuitGraph(m), { ...state, loadsOn, ...(invOff.size ? { inverterIdsOn: mode.inverterIdsOn.filter((id) => !invOff.has(id)) } : {}) }, { stepMin: 15 });
      const td = p.banks.find((b) => b.bankId === "house")!.tillDawn;
      expect(td.reaches).toBe(true);
      expect(td.marginSocPct ?? 0).toBeGreaterThanOrEqual(margin);
      expect(plan.actions.filter((a) => a.kind !== "inverter-off").every((a) => !juniperModel.loads.find((l) => l.id === a.loadId)!.essential)).toBe(true);
    }), { numRuns: 5 });
  }, 60_000);
});
