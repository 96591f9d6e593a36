import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { largeRig } from "../../tests/fixtures/large-rig";
import { buildCircuitGraph } from "./circuit-graph";
import { planForDawn, type DawnAction } from "./dawn-plan";
import type { RigModel } from "./model";
import { runProjection } from "./projection";
import type { CurrentState } from "./state";

/** Apply actions independently of the planner and check the verdict with the projection. */
function passes(model: RigModel, state: CurrentState, modeId: string, actions: DawnAction[], margin: number): boolean {
  const halve = new Set(actions.filter((a) => a.kind === "halve").map((a) => a.loadId));
  const invOff = new Set(actions.filter((a) => a.kind === "inverter-off").map((a) => a.loadId));
  // An inverter off takes the AC loads with it (every AC load in these rigs is behind the one inverter).
  const off = new Set([...actions.filter((a) => a.kind === "off").map((a) => a.loadId), ...(invOff.size ? model.loads.filter((l) => l.current === "ac").map((l) => l.id) : [])]);
  const mode = model.modes.find((x) => x.id === modeId)!;
  const m: RigModel = { ...model, modes: model.modes.map((x) => (x.id !== modeId ? x : { ...x, loads: x.loads.map((l) => (halve.has(l.loadId) ? { ...l, hoursPerDay: l.hoursPerDay / 2 } : l)) })) };
  const loadsOn = mode.loads.filter((l) => l.hoursPerDay > 0 && !off.has(l.loadId)).map((l) => l.loadId);
  const inverterIdsOn = mode.inverterIdsOn.filter((id) => !invOff.has(id));
  const p = runProjection(m, buildCircuitGraph(m), { ...state, loadsOn, ...(invOff.size ? { inverterIdsOn } : {}) }, { stepMin: 15 });
  const td = p.banks.find((b) => b.bankId === p.primaryBankId)!.tillDawn;
  return td.reaches && (td.marginSocPct ?? 0) >= margin;
}

describe("dawn plan", () => {
  const g = buildCircuitGraph(juniperModel);
  const state: CurrentState = { dateTime: "2026-10-15T19:30:00-06:00", modeId: "parked-night", banks: [{ bankId: "house", socPct: 40 }], weatherFactor: 1 };

  it("a full bank needs no plan", () => {
    const p = planForDawn(juniperModel, g, { ...state, banks: [{ bankId: "house", socPct: 95 }] });
    expect(p.needed).toBe(false);
    expect(p.actions).toEqual([]);
  });

  it("Juniper at 40 % reaches dawn with too little margin; the exact search finds a minimal plan of non-essential loads", () => {
    expect(passes(juniperModel, state, "parked-night", [], 5)).toBe(false);
    const p = planForDawn(juniperModel, g, state, { marginSocPct: 5 });
    expect(p.needed).toBe(true);
    expect(p.method).toBe("exact");
    expect(p.found).toBe(true);
    expect(p.actions.length).toBeGreaterThan(0);
    expect(p.actions.filter((a) => a.kind !== "inverter-off").every((a) => !juniperModel.loads.find((l) => l.id === a.loadId)!.essential)).toBe(true);
    expect(passes(juniperModel, state, "parked-night", p.actions, 5)).toBe(true);
    // Minimal: dropping any one action no longer passes.
    for (let i = 0; i < p.actions.length; i++) {
      expect(passes(juniperModel, state, "parked-night", p.actions.filter((_, j) => j !== i), 5)).toBe(false);
    }
    // Ranked best first by runway gained per hour of use given up.
    for (let i = 1; i < p.ranked.length; i++) expect(p.ranked[i - 1]!.runwayGainPerComfortH).toBeGreaterThanOrEqual(p.ranked[i]!.runwayGainPerComfortH);
  });

  it("a bank that essential loads alone flatten gets no plan, and says so", () => {
    const p = planForDawn(juniperModel, g, { ...state, banks: [{ bankId: "house", socPct: 15.5 }] }, { marginSocPct: 40 });
    expect(p.found).toBe(false);
    expect(p.how.note).toMatch(/essential loads alone/);
  });

  it("the large rig (60 loads) uses the greedy search and its plan passes", () => {
    const m = largeRig();
    const s: CurrentState = { dateTime: "2026-10-15T19:30:00-06:00", modeId: "m-parked", banks: [{ bankId: "house", socPct: 30 }, { bankId: "aux", socPct: 60 }, { bankId: "starter", socPct: 90 }], weatherFactor: 0.2 };
    const p = planForDawn(m, buildCircuitGraph(m), s, { marginSocPct: 5 });
    expect(p.needed).toBe(true);
    expect(p.method).toBe("greedy");
    if (p.found) expect(passes(m, s, "m-parked", p.actions, 5)).toBe(true);
    expect(p.projectionsRun).toBeLessThan(20);
  });
});
