// The shared-bus configuration of issue 10 ("Larkspur", our own fixture) with values worked by
// hand in the comments. Cable resistance: NEC Ch. 9 Table 8 (stranded copper, Ω/1000 ft at
// 75 °C; secondary copy) corrected to 30 °C with the table note's α = 0.00323. Device
// resistances: the engine's planning defaults (trade practice, from memory; app/engine/resistance.ts).
import { describe, expect, it } from "vitest";
import { larkspurModel } from "../../tests/fixtures/larkspur";
import { runAudit } from "./audit";
import { buildCircuitGraph } from "./circuit-graph";
import { computeBudget } from "./draw";
import { validateModel, type RigModel } from "./model";
import { operationsFor } from "./operations";
import { runProjection } from "./projection";
import { solveState } from "./solution";

const m = larkspurModel;
const camp = { modeId: "camp" };
const at = (positions: Record<string, string>) => buildCircuitGraph(m, positions);
const night = "2026-10-15T20:00:00-06:00";

describe("Larkspur: two split-port lithium batteries, an AGM, a changeover", () => {
  it("is a valid version-2 model", () => {
    expect(validateModel(m).ok).toBe(true);
  });

  it("standby: both contactors engaged on the load side (2 × 3.0 W), none on the charge side (2 × 0.4 W)", () => {
    const load = computeBudget(m, at({ "sw-crit": "load" }), camp);
    expect(load.solution.bms["bat-a"]!.stateId).toBe("engaged");
    expect(load.solution.bms["bat-b"]!.stateId).toBe("engaged");
    expect(load.solution.standbyBmsW).toBeCloseTo(6.0, 9);
    const charge = computeBudget(m, at({ "sw-crit": "charge" }), camp);
    expect(charge.solution.bms["bat-a"]!.stateId).toBe("asleep");
    expect(charge.solution.standbyBmsW).toBeCloseTo(0.8, 9);
    // Per day: 6.0 × 24 = 144 Wh against 0.8 × 24 = 19.2 Wh.
    expect(load.standbyWhPerDay).toBeCloseTo(144, 6);
    expect(charge.standbyWhPerDay).toBeCloseTo(19.2, 6);
  });

  it("operations for the lights from all off: 4 on the load side (BMS on, reset, disconnect, its switch), 1 on the charge side", () => {
    const g = at({});
    const viaLoad = operationsFor(m, g, "lights", "all-off", { hold: { "sw-crit": "load" } })!;
    expect(viaLoad.operations.map((o) => o.name)).toEqual(["BMS on", "BMS reset", "Battery disconnect", "Lights switch"]);
    // The breaker and the fuses are checks, and so is the changeover already in position.
    expect(viaLoad.checks.map((c) => c.name)).toContain("Critical feed breaker 30 A");
    expect(viaLoad.checks.map((c) => c.name)).toContain("Critical loads changeover");
    expect(viaLoad.lowVoltageProtected).toBe(true);
    const viaCharge = operationsFor(m, g, "lights", "all-off", { hold: { "sw-crit": "charge" } })!;
    expect(viaCharge.operations.map((o) => o.name)).toEqual(["Lights switch"]);
    expect(viaCharge.checks.map((c) => c.name)).toContain("Inline fuse 20 A");
    expect(viaCharge.lowVoltageProtected).toBe(false);
    // From "now" with everything already set, nothing is left to operate.
    const now = operationsFor(m, at({ "sw-crit": "load" }), "lights", "now", { plan: camp })!;
    expect(now.operationCount).toBe(0);
  });

  it("outside low-voltage protection only in the positions that put the loads there", () => {
    const load = runAudit(m, at({ "sw-crit": "load" }), camp);
    expect(load.outsideLowVoltageProtection).toEqual([]);
    const charge = runAudit(m, at({ "sw-crit": "charge" }), camp);
    expect(charge.outsideLowVoltageProtection.map((x) => x.loadId)).toEqual(["fridge", "lights", "pump", "usb", "cam"]);
    expect(charge.outsideLowVoltageProtection[0]!.bankIds.sort()).toEqual(["agm", "bat-a", "bat-b"]);
    // The standby this avoids: engaging both contactors would cost 6.0 − 0.8 = 5.2 W.
    const f = charge.findings.find((x) => x.id === "outside-protection:fridge")!;
    expect(f.numbers.standbyAvoidedW).toBeCloseTo(5.2, 9);
    expect(f.numbers.standbyAvoidedWhPerDay).toBeCloseTo(124.8, 6);
  });

  it("backdoor charging appears and disappears with the wiring", () => {
    // Load side: both load ports paralleled while both batteries charge from the charge bus.
    const load = runAudit(m, at({ "sw-crit": "load" }), camp);
    const back = load.findings.filter((f) => f.kind === "backdoor-charging").map((f) => f.id).sort();
    expect(back).toEqual(["backdoor-charging:bat-a/load", "backdoor-charging:bat-b/load"]);
    expect(load.findings[0]!.severity).toBe("danger");
    // Charge side: the contactors stay open, the load ports are dead: no backdoor.
    const charge = runAudit(m, at({ "sw-crit": "charge" }), camp);
    expect(charge.findings.some((f) => f.kind === "backdoor-charging")).toBe(false);
    // One battery alone on the load bus: no backdoor either.
    const single: RigModel = { ...m, circuits: m.circuits.filter((c) => c.id !== "c-b-load") };
    expect(runAudit(single, buildCircuitGraph(single, { "sw-crit": "load" }), camp).findings.some((f) => f.kind === "backdoor-charging")).toBe(false);
    // A DC-DC charger wired onto the load bus reaches both load ports straight away.
    const dcdc: RigModel = {
      ...single,
      sources: [...m.sources, { id: "dcdc", name: "DC-DC charger", kind: "dcdc", ratedA: 25 }],
      circuits: [...single.circuits, { id: "c-dcdc", name: "DC-DC output", from: { kind: "source", id: "dcdc" }, to: { kind: "bus", id: "load-bus" }, switches: [], criticality: "critical" }],
    };
    const withCharger = runAudit(dcdc, buildCircuitGraph(dcdc, { "sw-crit": "load" }), camp).findings.find((f) => f.kind === "backdoor-charging")!;
    expect(withCharger.id).toBe("backdoor-charging:bat-a/load");
    expect(withCharger.numbers.sourceMaxA).toBe(25);
    // The AGM straight on the lithium charge ports: mixed chemistries, in every position.
    expect(charge.findings.some((f) => f.kind === "mixed-chemistry" && f.severity === "warning")).toBe(true);
  });

  it("the fridge on the charge side sees the sum of two cables and their devices: 3.54 % against 3 %", () => {
    const a = runAudit(m, at({ "sw-crit": "charge" }), { modeId: "camp", loadsOn: ["fridge"] });
    const d = a.endToEnd.find((x) => x.loadId === "fridge")!;
    // Fridge current 60 W / 12.8 V = 4.6875 A; Battery A carries a third on its feed (three
    // banks of 100 Ah share the charge bus by capacity): 1.5625 A.
    // R per m at 30 °C = R75 / 304.8 × (1 + 0.00323 × (30 − 75)) = R75 / 304.8 × 0.85465.
    const perM = (r75PerKft: number) => (r75PerKft / 304.8) * 0.85465;
    // Battery A BMS port (MOSFETs) 1 mΩ at 1.5625 A.
    const port = 1.5625 * 0.001;
    // Charge feed: 6 AWG (0.491) × 2 × 1 m + fuse 100 A (75 mV / 100 A = 0.75 mΩ) + 4 × 0.1 mΩ.
    const feed = 1.5625 * (perM(0.491) * 2 + 0.00075 + 0.0004);
    // Charge-side run: 12 AWG (1.98) × 2 × 4 m + inline fuse 20 A (3.75 mΩ) + changeover 0.2 mΩ + 0.4 mΩ.
    const run = 4.6875 * (perM(1.98) * 8 + 0.00375 + 0.0002 + 0.0004);
    // Fridge circuit: 12 AWG × 2 × 3 m + fuse 10 A (7.5 mΩ) + rocker 5 mΩ + 0.4 mΩ.
    const fridge = 4.6875 * (perM(1.98) * 6 + 0.0075 + 0.005 + 0.0004);
    const total = port + feed + run + fridge;
    expect(total).toBeCloseTo(0.4529, 3); // 0.0016 + 0.0061 + 0.2286 + 0.2166 V
    expect(d.dropV).toBeCloseTo(total, 4);
    expect(d.dropPct).toBeCloseTo((100 * total) / 12.8, 3);
    expect(d.ok).toBe(false);
    // Each cable alone is within 3 %: the run 4.6875 × 12 AWG × 8 m is 1.63 %.
    expect((100 * 4.6875 * perM(1.98) * 8) / 12.8).toBeLessThan(3);
    expect(a.findings.some((f) => f.id === "end-to-end-drop:fridge")).toBe(true);
  });

  it("the runway counts both batteries: 1,152 Wh each / 17.5 W = 65.8 h (one battery alone: 36 h)", () => {
    // Fridge 60 W × 40 % = 24 W and camera 5 W on the load bus, split 50/50 between the two
    // identical batteries (14.5 W each), plus each BMS engaged 3.0 W: 17.5 W per battery.
    // Usable per battery: 100 Ah × (100 − 10) % × 12.8 V = 1,152 Wh. No sun (weather 0).
    const state = { dateTime: night, modeId: "camp", loadsOn: ["fridge", "cam"], banks: [{ bankId: "bat-a", socPct: 100 }, { bankId: "bat-b", socPct: 100 }, { bankId: "agm", socPct: 100 }], weatherFactor: 0, switchPositions: { "sw-crit": "load" } };
    const p = runProjection(m, at({ "sw-crit": "load" }), state);
    expect(p.banks.find((b) => b.bankId === "bat-a")!.runwayH).toBeCloseTo(1152 / 17.5, 1);
    expect(p.banks.find((b) => b.bankId === "bat-b")!.runwayH).toBeCloseTo(1152 / 17.5, 1);
    // With Battery B's load port unwired, A alone carries 29 W + its 3.0 W: 1,152 / 32 = 36 h.
    const single: RigModel = { ...m, circuits: m.circuits.filter((c) => c.id !== "c-b-load") };
    const p1 = runProjection(single, buildCircuitGraph(single, { "sw-crit": "load" }), state);
    expect(p1.banks.find((b) => b.bankId === "bat-a")!.runwayH).toBeCloseTo(36, 1);
  });

  it("the array's current goes to every bank on the charge bus, a third each by capacity", () => {
    const sol = solveState(m, at({ "sw-crit": "load" }), camp);
    expect(sol.sources.pv!.bankShares.map((s) => [s.bankId, s.share])).toEqual([["bat-a", 1 / 3], ["bat-b", 1 / 3], ["agm", 1 / 3]]);
    const rated: RigModel = { ...m, banks: m.banks.map((b, i) => ({ ...b, internalResistanceMOhm: [5, 5, 10][i]! })) };
    // By internal resistance: 1/5 : 1/5 : 1/10 → 0.4, 0.4, 0.2 (current divider).
    const s2 = solveState(rated, buildCircuitGraph(rated, { "sw-crit": "load" }), camp);
    expect(s2.sources.pv!.bankShares.map((s) => s.share)).toEqual([0.4, 0.4, 0.2]);
  });

  it("a changeover set to off conducts nowhere: the critical loads have no power and no finding asks for a position", () => {
    const sol = solveState(m, at({ "sw-crit": "off" }), camp);
    for (const id of ["fridge", "lights", "pump", "usb", "cam"]) expect(sol.loads[id]!.powered).toBe(false);
    expect(sol.positions["sw-crit"]!.origin).toBe("set");
    expect(runAudit(m, at({ "sw-crit": "off" }), camp).findings.some((f) => f.kind === "changeover-no-position")).toBe(false);
    expect(computeBudget(m, at({ "sw-crit": "off" }), camp).loadWhPerDay).toBe(0);
  });

  it("a changeover with no position is taken as off and reported", () => {
    const a = runAudit(m, at({}), camp);
    const f = a.findings.find((x) => x.kind === "changeover-no-position")!;
    expect(f.subjectIds).toEqual(["sw-crit"]);
    expect(f.numbers.loadsUnpowered).toBe(5);
    expect(solveState(m, at({}), camp).positions["sw-crit"]!.origin).toBe("unknown");
  });
});
