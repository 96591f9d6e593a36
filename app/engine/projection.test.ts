import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { buildCircuitGraph } from "./circuit-graph";
import { localHourFn, runProjection } from "./projection";
import { oneLoadRig } from "./test-rigs";

const at = "2026-10-15T19:30:00-06:00";

function balanceResidual(e: { storedChangeWh: number; chargedWh: number; chargeEfficiency: number; drawnWh: number; peukertWh: number }): number {
  return e.storedChangeWh - (e.chargedWh * e.chargeEfficiency - e.drawnWh - e.peukertWh);
}

describe("projection, worked examples (ours)", () => {
  it("one 64 W load on a 100 Ah LiFePO4 bank from full to a 20 % floor", () => {
    // Usable: 100 Ah × (100 − 20) % = 80 Ah × 12.8 V = 1,024 Wh. Runway 1,024 Wh / 64 W = 16 h.
    // After 8 h: 100 − 8 h × 5 A / 100 Ah × 100 = 60 %.
    const m = oneLoadRig({ loadW: 64 });
    const p = runProjection(m, buildCircuitGraph(m), { dateTime: at, modeId: "m", banks: [{ bankId: "b", socPct: 100 }] });
    const b = p.banks[0]!;
    expect(b.runwayH).toBeCloseTo(16, 6);
    expect(b.socPct[(8 * 60) / 5]).toBeCloseTo(60, 6);
    // Clamped at the floor afterwards; the load is then unserved: (72 − 16) h × 64 W = 3,584 Wh.
    expect(b.minSocPct).toBeCloseTo(20, 6);
    expect(b.endSocPct).toBeCloseTo(20, 6);
    expect(b.energy.unmetWh).toBeCloseTo(3584, 3);
    expect(b.tillDawn.reaches).toBe(false);
    expect(b.tillDawn.nextWindowMs).toBeNull();
  });

  it("a 10 A shore charger at 90 % efficiency fills a half-full bank while a 64 W load runs", () => {
    // Net into the battery: 10 A × 12.8 V − 64 W = 64 W; stored 64 × 0.9 = 57.6 W.
    // From 50 % (640 Wh) to full (1,280 Wh): 640 / 57.6 = 11.11 h; then curtailed.
    const m = oneLoadRig({ loadW: 64, shoreA: 10, chargeEfficiencyPct: 90 });
    const p = runProjection(m, buildCircuitGraph(m), { dateTime: at, modeId: "m", banks: [{ bankId: "b", socPct: 50 }] });
    const b = p.banks[0]!;
    const fullIdx = b.socPct.findIndex((x) => x >= 100 - 1e-9);
    // The curve is sampled every 5 min, so full shows at the end of the step holding 11.11 h.
    expect(fullIdx * 5 / 60).toBeGreaterThanOrEqual(640 / 57.6);
    expect(fullIdx * 5 / 60).toBeLessThan(640 / 57.6 + 5 / 60);
    expect(b.runwayH).toBeNull();
    expect(b.tillDawn.chargingNow).toBe(true);
    expect(Math.abs(balanceResidual(b.energy))).toBeLessThan(1e-6);
  });

  it("Peukert makes a lead-acid bank's runway shorter than the plain Ah count", () => {
    // 100 Ah flooded C20, k 1.25, floor 50 %: 50 Ah. At 240 W / 12 V = 20 A:
    // I_eff = 20 × (20×20/100)^0.25 = 28.284 A → 50 / 28.284 = 1.768 h (plain: 2.5 h).
    const m = oneLoadRig({ loadW: 240, chemistry: "flooded", floorPct: 50 });
    const p = runProjection(m, buildCircuitGraph(m), { dateTime: at, modeId: "m", banks: [{ bankId: "b", socPct: 100 }] }, { stepMin: 1 });
    expect(p.banks[0]!.runwayH).toBeCloseTo(1.768, 2);
    expect(p.banks[0]!.energy.peukertWh).toBeGreaterThan(0);
    expect(Math.abs(balanceResidual(p.banks[0]!.energy))).toBeLessThan(1e-6);
  });
});

describe("projection of Juniper", () => {
  const g = buildCircuitGraph(juniperModel);
  const state = { dateTime: at, modeId: "parked-night", banks: [{ bankId: "house", socPct: 70 }, { bankId: "starter", restingV: 12.45 }] };

  it("energy balances in every mode: ΔE = charged × η − drawn − Peukert", () => {
    for (const modeId of ["parked-night", "travel-day", "storage"]) {
      const p = runProjection(juniperModel, g, { ...state, modeId });
      for (const b of p.banks) {
        expect(Math.abs(balanceResidual(b.energy))).toBeLessThan(1e-6);
        // Sources and loads: what came in either went to loads, the battery or was curtailed.
        const served = b.energy.loadWh - b.energy.unmetWh - b.energy.drawnWh; // served directly by sources
        expect(b.energy.sourceWh).toBeCloseTo(served + b.energy.chargedWh + b.energy.curtailedWh, 6);
      }
    }
  });

  it("gives a till-dawn verdict for the night ahead", () => {
    const p = runProjection(juniperModel, g, state);
    const house = p.banks.find((b) => b.bankId === "house")!;
    expect(house.startSocPct).toBe(70);
    expect(house.tillDawn.chargingNow).toBe(false);
    expect(house.tillDawn.nextWindowKind).toBe("sun");
    // The window opens after sunrise and before local noon the next day.
    expect(house.tillDawn.nextWindowMs!).toBeGreaterThan(p.nextSunriseMs!);
    expect(house.tillDawn.nextWindowMs!).toBeLessThan(Date.parse("2026-10-16T12:00:00-06:00"));
    expect(house.tillDawn.reaches).toBe(true);
    expect(house.socAtNextSunrisePct!).toBeLessThan(70);
    expect(house.socAtNextSunrisePct!).toBeGreaterThan(house.stopSocPct);
    // Starter SoC from its resting voltage: 12.45 V is 75 % on the BCI table.
    const starter = p.banks.find((b) => b.bankId === "starter")!;
    expect(starter.startSocFrom).toBe("resting-voltage");
    expect(starter.startSocPct).toBeCloseTo(75, 6);
  });

  it("no sun shortens the runway; the drive of a travel day charges", () => {
    const sunny = runProjection(juniperModel, g, state).banks[0]!;
    const dark = runProjection(juniperModel, g, { ...state, weatherFactor: 0 }).banks[0]!;
    expect(dark.runwayH!).toBeLessThan(sunny.runwayH ?? Infinity);
    const travel = runProjection(juniperModel, g, { ...state, modeId: "travel-day" }).banks[0]!;
    expect(travel.runwayH).toBeNull();
    expect(travel.endSocPct).toBeGreaterThan(70);
  });

  it("local hours follow the time zone across the end of daylight saving", () => {
    // America/Denver leaves MDT on 2026-11-01 at 02:00 local (08:00 UTC).
    const f = localHourFn(Date.parse("2026-10-31T12:00:00Z"), Date.parse("2026-11-02T12:00:00Z"), "America/Denver");
    expect(f(Date.parse("2026-11-01T07:00:00Z"))).toBeCloseTo(1, 9); // 01:00 MDT
    expect(f(Date.parse("2026-11-01T09:00:00Z"))).toBeCloseTo(2, 9); // 02:00 MST
  });
});
