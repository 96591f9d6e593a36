import { describe, expect, it } from "vitest";
import { oneLoadRig } from "~/engine/test-rigs";
import type { RigModel } from "~/engine/model";
import { emptyRigState, type RigState } from "~/schemas/rig-state";
import { alertDawnPlanLine, dawnPlanSentence, listWords } from "./dawn-line";
import { alertText } from "./text";
import { planForDawn } from "~/engine/dawn-plan";
import { buildCircuitGraph } from "~/engine/circuit-graph";

/**
 * A hand-made small rig: one 12.8 V 100 Ah LiFePO4 bank (1,280 Wh, floor 20 %), 200 Wp of
 * panels, an essential 10 W fridge and a 30 W cabin fan heater, both on all night.
 * At 19:30 local with 40 % the bank has (40 − 20) % × 1,280 Wh = 256 Wh above the floor.
 * Until the sun charges again (after sunrise, about 12 h away) the two loads draw
 * (10 + 30) W × ~12 h ≈ 480 Wh > 256 Wh: it falls short. The fridge alone, 10 W × ~12 h ≈ 120 Wh,
 * fits; so the plan is the fan heater off (essential fridge kept). Arithmetic worked by hand.
 */
function smallRig(): RigModel {
  const base = oneLoadRig({ loadW: 10, solarWp: 200 });
  return {
    ...base,
    loads: [
      { id: "fridge", name: "the galley fridge", current: "dc", powerW: 10, essential: true },
      { id: "heater", name: "the cabin fan heater", current: "dc", powerW: 30, essential: false },
    ],
    circuits: [
      ...base.circuits.filter((c) => c.id !== "c2"),
      { id: "c-fridge", name: "Fridge feed", from: { kind: "bus", id: "bus" }, to: { kind: "load", id: "fridge" }, switches: [], criticality: "critical" },
      { id: "c-heater", name: "Heater feed", from: { kind: "bus", id: "bus" }, to: { kind: "load", id: "heater" }, switches: [], criticality: "normal" },
    ],
    modes: [{ id: "m", name: "Evening", loads: [{ loadId: "fridge", hoursPerDay: 24 }, { loadId: "heater", hoursPerDay: 24 }], inverterIdsOn: [], sources: [{ sourceId: "pv", enabled: true }] }],
  };
}

const NOW = Date.parse("2026-10-15T19:30:00-06:00");
function stateAt(socPct: number): RigState {
  return { ...emptyRigState("rig-1"), modeId: "m", soc: { socPct, source: "entered", takenAt: new Date(NOW).toISOString() } };
}

describe("the dawn plan in alert words", () => {
  it("lists load names in plain English", () => {
    expect(listWords(["a"])).toBe("a");
    expect(listWords(["a", "b"])).toBe("a and b");
    expect(listWords(["a", "b", "c"])).toBe("a, b and c");
  });

  it("a short night: switch off the fan heater, the essential fridge stays", () => {
    const model = smallRig();
    const line = alertDawnPlanLine(model, stateAt(40), NOW);
    expect(line).not.toBeNull();
    expect(line).toContain("switch off the cabin fan heater");
    expect(line).not.toContain("fridge");
    expect(line).toMatch(/^To make it to the next charge, \d+ % above the floor: switch off the cabin fan heater \(essential loads stay on; 24 h of use a day given up\)\.$/);
  });

  it("a full bank needs no plan: no line", () => {
    expect(alertDawnPlanLine(smallRig(), stateAt(95), NOW)).toBeNull();
  });

  it("when the essential fridge alone flattens the bank, the line says no plan is enough", () => {
    // 21 % leaves 1 % × 1,280 = 12.8 Wh above the floor: the fridge alone (10 W × ~12 h) needs more.
    const line = alertDawnPlanLine(smallRig(), stateAt(21), NOW);
    expect(line).toBe("Switching off every load that is not essential is not enough to reach the next charge: charge sooner if you can.");
  });

  it("halved hours are worded as such, and the line lands in the falls-short alert", () => {
    const model = smallRig();
    const plan = planForDawn(model, buildCircuitGraph(model), { dateTime: new Date(NOW).toISOString(), modeId: "m", banks: [{ bankId: "b", socPct: 40 }] });
    const halved = { ...plan, actions: plan.actions.map((a) => ({ ...a, kind: "halve" as const, comfortLostH: 12 })), comfortLostH: 12 };
    expect(dawnPlanSentence(halved)).toContain("halve the hours of the cabin fan heater");
    const text = alertText(
      { rule: "falls_short", rigName: "Juniper", rigId: "rig-1", detail: { runwayH: 5 }, timeZone: "America/Denver", appUrl: "https://tilldawn.example", dawnPlanLine: dawnPlanSentence(plan) },
      NOW,
    );
    expect(text.body).toContain("switch off the cabin fan heater");
    expect(text.body.indexOf("switch off")).toBeLessThan(text.body.indexOf("Open Now:"));
  });
});
