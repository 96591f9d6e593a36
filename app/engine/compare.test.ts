import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { compareModels } from "./compare";

const state = { dateTime: "2026-10-15T19:30:00-06:00", banks: [{ bankId: "house", socPct: 80 }, { bankId: "starter", socPct: 90 }] };

describe("draft vs as built", () => {
  it("moving the satellite dish to the charge bus drops the contactor need in Storage but puts the dish outside low-voltage protection", () => {
    const draft = structuredClone(juniperModel);
    const dish = draft.circuits.find((c) => c.id === "c-dish")!;
    dish.from = { kind: "bus", id: "charge-bus" };
    dish.switches = [{ switchId: "sw-dish", position: "on" }];
    const cmp = compareModels(juniperModel, draft, state, { horizonH: 24 });
    const storage = cmp.modes.find((m) => m.modeId === "storage")!;
    // The dish's 6 W standby is now live in Storage (charge side, no contactor): +6 W, +144 Wh/day.
    expect(storage.b!.standbyW - storage.a!.standbyW).toBeCloseTo(6, 9);
    expect(storage.b!.standbyWhPerDay - storage.a!.standbyWhPerDay).toBeCloseTo(144, 9);
    expect(cmp.outsideLowVoltageProtection.added).toEqual(["Satellite internet dish"]);
    expect(cmp.outsideLowVoltageProtection.removed).toEqual([]);
  });

  it("removing a switch on an essential load lowers its switch count; an undersized fuse shows as a new audit failure", () => {
    const draft = structuredClone(juniperModel);
    draft.circuits.find((c) => c.id === "c-panel")!.switches = [];
    draft.protections.find((p) => p.id === "f-pump")!.ratingA = 3;
    const cmp = compareModels(juniperModel, draft, state, { horizonH: 24 });
    const fridge = cmp.essentialLoads.find((l) => l.loadId === "fridge")!;
    expect(fridge.aOperations).toBe(4); // from all off: bank load enable (BMS), main, panel, fridge switch
    expect(fridge.bOperations).toBe(3);
    expect(cmp.auditFailures.a).toBe(0);
    expect(cmp.auditFailures.added).toHaveLength(1);
    expect(cmp.auditFailures.added[0]).toMatch(/^c-pump: /);
  });

  it("a bigger bank lengthens the Parked night runway", () => {
    const draft = structuredClone(juniperModel);
    draft.banks[0]!.parallelCount = 4;
    const cmp = compareModels(juniperModel, draft, state);
    const parked = cmp.modes.find((m) => m.modeId === "parked-night")!;
    expect(parked.b!.runwayH ?? Infinity).toBeGreaterThan(parked.a!.runwayH!);
  });
});
