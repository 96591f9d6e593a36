import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { buildCircuitGraph } from "./circuit-graph";
import { computeBudget, drawProfiles, PROFILE_SLOTS } from "./draw";

const g = buildCircuitGraph(juniperModel);

describe("daily budget (worked examples, ours)", () => {
  it("Juniper, Parked night", () => {
    const b = computeBudget(juniperModel, g, { modeId: "parked-night" });
    const wh = (id: string) => b.loads.find((l) => l.loadId === id)!;
    // fridge 48 W × 35 % × 24 h = 403.2 Wh
    expect(wh("fridge").whPerDay).toBeCloseTo(403.2, 6);
    // water pump given in amps: 5 A × 12.8 V = 64 W × 0.3 h = 19.2 Wh
    expect(wh("water-pump").runW).toBeCloseTo(64, 9);
    expect(wh("water-pump").whPerDay).toBeCloseTo(19.2, 6);
    // hob on the inverter: 1,800 W / 0.90 = 2,000 W from the bank × 80 % × 0.5 h = 800 Wh; 2,000/12.8 = 156.25 A
    expect(wh("hob").bankW).toBeCloseTo(2000, 9);
    expect(wh("hob").bankA).toBeCloseTo(156.25, 9);
    expect(wh("hob").whPerDay).toBeCloseTo(800, 6);
    // sat dish: 75 W × 5 h = 375 Wh + standby 6 W × 19 h = 114 Wh
    expect(wh("sat-dish").whPerDay).toBeCloseTo(489, 6);
    // Loads running: 403.2 + 12 + 126 + 120 + 72 + 19.2 + 182 + 375 + 800 = 2,109.4 Wh
    expect(b.loadWhPerDay).toBeCloseTo(2109.4, 6);
    // Standby: load standby 3 (heater 0.2 × 15) + 6 (fan 0.3 × 20) + 114 (dish)
    //   + house electronics 0.6 × 24 = 14.4 + contactor 4.2 × 24 = 100.8
    //   + starter 0.3 × 24 = 7.2 + inverter idle 18 × 24 = 432  → 677.4 Wh
    expect(b.standbyWhPerDay).toBeCloseTo(677.4, 6);
    expect(b.totalWhPerDay).toBeCloseTo(2786.8, 6);
    // Share 677.4 / 2786.8 = 24.31 %
    expect(b.standbySharePct).toBeCloseTo(24.307, 2);
    const house = b.banks.find((x) => x.bankId === "house")!;
    expect(house.whPerDay).toBeCloseTo(2779.6, 6);
    expect(house.ahPerDay).toBeCloseTo(2779.6 / 12.8, 6);
    expect(house.contactorEngaged).toBe(true);
  });

  it("Juniper, Storage: only the charge-side alarm runs, so the contactor and its standby drop out", () => {
    const b = computeBudget(juniperModel, g, { modeId: "storage" });
    // alarm 0.5 × 24 = 12; heater standby 0.2 × 24 = 4.8 (charge side stays live);
    // house electronics 14.4; starter 7.2; dish, fan and inverter standby are behind the open contactor.
    expect(b.totalWhPerDay).toBeCloseTo(38.4, 6);
    expect(b.standby.find((s) => s.kind === "bank-bms" && s.bankId === "house")!.w).toBe(0.6);
    expect(b.banks[0]!.contactorEngaged).toBe(false);
  });

  it("switching the hob on by hand turns its inverter on", () => {
    const b = computeBudget(juniperModel, g, { modeId: "storage", loadsOn: ["co-alarm", "hob"] });
    // The hob is not in the Storage mode, so it runs all day: 2,000 W × 80 % × 24 h
    expect(b.loads.find((l) => l.loadId === "hob")!.whPerDay).toBeCloseTo(38400, 6);
    expect(b.standby.some((s) => s.kind === "inverter-idle")).toBe(true);
    // The enable follows the hob: the guard is engaged, 0.6 + 4.2 W.
    expect(b.banks.find((x) => x.bankId === "house")!.contactorEngaged).toBe(true);
    expect(b.standby.find((s) => s.kind === "bank-bms" && s.bankId === "house")!.w).toBeCloseTo(4.8, 9);
  });

  it("the 5-minute draw profile integrates to the budget", () => {
    for (const modeId of ["parked-night", "travel-day", "storage"]) {
      const b = computeBudget(juniperModel, g, { modeId });
      const p = drawProfiles(juniperModel, g, b, { modeId });
      for (const bank of b.banks) {
        const sum = p.get(bank.bankId)!.reduce((s, w) => s + (w * 24) / PROFILE_SLOTS, 0);
        expect(sum).toBeCloseTo(bank.whPerDay, 6);
      }
    }
  });
});
