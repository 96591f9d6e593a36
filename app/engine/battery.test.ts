import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import {
  bankCapacityAh, bankNominalV, peukertCapacityAh, peukertEffectiveCurrentA, peukertRuntimeFromPeukertCapacityH,
  peukertRuntimeH, socFromRestingVoltage, temperatureCapacityFactor, usableEnergy,
} from "./battery";
import type { Bank } from "./model";

const house = juniperModel.banks[0]!;
const flooded12: Bank = {
  id: "f", name: "Flooded 12 V", role: "auxiliary", chemistry: "flooded", ratedAh: 100, batteryNominalV: 12,
  seriesCount: 1, parallelCount: 1, usableFloorSocPct: 50, lowVoltageCutoffV: 11.5,
  ports: [{ id: "main", name: "Main", role: "common", lowVoltageProtected: false, chargeProtected: false, contactor: false }],
};

describe("Peukert", () => {
  it("reproduces the electrotechnik.net worked example in Peukert's original form (secondary)", () => {
    // Source: electrotechnik.net Peukert example (secondary): C = 100 Ah, k = 1.2, I = 5 A → 14.5 h.
    // That example uses t = C / I^k (C = capacity at 1 A): 100 / 5^1.2 = 100 / 6.8986 = 14.496 h.
    expect(peukertRuntimeFromPeukertCapacityH(100, 5, 1.2)).toBeCloseTo(14.5, 1);
  });

  it("rated form gives exactly H at the rated current and agrees with the original form", () => {
    // Definition of the rating (Peukert 1897, rated form): at I = C/H, t = H · 1^k = H.
    const at = peukertRuntimeH({ capacityAh: 100, ratedHourRateH: 20, currentA: 5, exponent: 1.2 });
    expect(at.runtimeH).toBeCloseTo(20, 10);
    // Same law: Cp = C^k · H^(1−k) = 100^1.2 · 20^−0.2 = 251.19 · 0.54928 = 137.97 Ah.
    const cp = peukertCapacityAh(100, 20, 1.2);
    expect(cp).toBeCloseTo(137.97, 1);
    for (const i of [1, 3, 10, 25, 60]) {
      expect(peukertRuntimeH({ capacityAh: 100, ratedHourRateH: 20, currentA: i, exponent: 1.2 }).runtimeH)
        .toBeCloseTo(peukertRuntimeFromPeukertCapacityH(cp, i, 1.2), 9);
    }
  });

  it("worked example (ours): 100 Ah C20 flooded, k = 1.25, 10 A", () => {
    // t = 20 · (100 / (10·20))^1.25 = 20 · 0.5^1.25 = 20 · 0.42045 = 8.409 h (vs 10 h without Peukert).
    const p = peukertRuntimeH({ capacityAh: 100, ratedHourRateH: 20, currentA: 10, exponent: 1.25 });
    expect(p.runtimeH).toBeCloseTo(8.409, 3);
    expect(p.effectiveCapacityAh).toBeCloseTo(84.09, 2);
    // Equivalent current drains the rated capacity at C / t = 100 / 8.409 = 11.89 A.
    expect(peukertEffectiveCurrentA(10, 100, 20, 1.25)).toBeCloseTo(100 / 8.409, 2);
    expect(p.how.formula).toContain("t = H");
  });
});

describe("SoC from resting voltage", () => {
  it("flooded 12 V follows the Battery Council International table at 80 °F (secondary)", () => {
    // BCI: 12.65 V 100 %, 12.45 V 75 %, 12.24 V 50 %, 12.06 V 25 %, 11.89 V 0 %.
    expect(socFromRestingVoltage(flooded12, 12.65).socPct).toBeCloseTo(100, 6);
    expect(socFromRestingVoltage(flooded12, 12.45).socPct).toBeCloseTo(75, 6);
    expect(socFromRestingVoltage(flooded12, 12.24).socPct).toBeCloseTo(50, 6);
    expect(socFromRestingVoltage(flooded12, 12.06).socPct).toBeCloseTo(25, 6);
    // Midway between 12.24 and 12.45 → 62.5 % by linear interpolation.
    expect(socFromRestingVoltage(flooded12, 12.345).socPct).toBeCloseTo(62.5, 6);
    // 24 V bank (two in series) reads 24.48 V at 50 %.
    expect(socFromRestingVoltage({ ...flooded12, seriesCount: 2 }, 24.48).socPct).toBeCloseTo(50, 6);
    expect(socFromRestingVoltage(flooded12, 12.24).confidence).toBe("high");
  });

  it("LiFePO4 passes through the published pseudo-OCV points and says low confidence on the flat part", () => {
    // Sunil, Pattipati & Balasingam, IEEE Trans. Instrum. Meas. 2025 (published):
    // per cell 3.2772 V ↔ SoC 0.2972; 3.3511 V ↔ 0.9833. Juniper is 4 cells in series.
    expect(socFromRestingVoltage(house, 4 * 3.2772).socPct).toBeCloseTo(29.72, 2);
    expect(socFromRestingVoltage(house, 4 * 3.3511).socPct).toBeCloseTo(98.33, 2);
    const mid = socFromRestingVoltage(house, 13.2);
    expect(mid.confidence).toBe("low");
    expect(mid.flatCurve).toBe(true);
    expect(mid.socHighPct - mid.socLowPct).toBeGreaterThan(20);
    expect(mid.how.note).toMatch(/flat/);
    // Below the knee the curve is steep enough to read: 3.15 V/cell.
    const low = socFromRestingVoltage(house, 12.6);
    expect(low.flatCurve).toBe(false);
    expect(low.confidence).not.toBe("low");
  });
});

describe("capacity and usable energy", () => {
  it("Juniper house bank: 3 × 100 Ah in parallel at 12.8 V", () => {
    expect(bankCapacityAh(house)).toBe(300);
    expect(bankNominalV(house)).toBe(12.8);
  });

  it("usable energy stops at the higher of the floor and the cutoff", () => {
    // Juniper at 80 %: cutoff 11.2 V = 2.8 V/cell → 0 % on the table; floor 15 % wins.
    // 300 Ah × (80 − 15)/100 = 195 Ah; × 12.8 V = 2,496 Wh.
    const u = usableEnergy(house, 80);
    expect(u.limitedBy).toBe("floor");
    expect(u.usableAh).toBeCloseTo(195, 9);
    expect(u.usableWh).toBeCloseTo(2496, 6);
    // Flooded with a floor below the cutoff: cutoff 12.06 V is 25 % on the BCI table.
    const f = usableEnergy({ ...flooded12, usableFloorSocPct: 10, lowVoltageCutoffV: 12.06 }, 75);
    expect(f.limitedBy).toBe("cutoff");
    expect(f.stopSocPct).toBeCloseTo(25, 6);
    expect(f.usableAh).toBeCloseTo(50, 6);
  });

  it("Peukert shortens lead-acid runtime at a high current", () => {
    // 100 Ah C20 flooded (k 1.25) from 100 % to the 50 % floor: 50 Ah.
    // At 5 A (the C20 rate) I_eff = 5 · (5·20/100)^0.25 = 5 A → 10 h.
    expect(usableEnergy(flooded12, 100, { currentA: 5 }).runtimeH).toBeCloseTo(10, 6);
    // At 20 A, I_eff = 20 · (400/100)^0.25 = 20 · 1.41421 = 28.284 A → 50/28.284 = 1.768 h.
    expect(usableEnergy(flooded12, 100, { currentA: 20 }).runtimeH).toBeCloseTo(1.768, 3);
  });

  it("lead-acid temperature effect matches IEEE 485 Table 1 (memory) and its cubic fit (secondary)", () => {
    // Cubic fit of IEEE 485 Table 1 quoted in a sizing-software note (secondary):
    // factor = −2.8117x³ + 4.1916x² − 2.4941x + 1.405 with x = T(°C)/100.
    const fit = (c: number) => { const x = c / 100; return -2.8117 * x ** 3 + 4.1916 * x ** 2 - 2.4941 * x + 1.405; };
    for (const c of [-3.9, 0, 4.4, 10, 15.6, 20, 25]) {
      expect(Math.abs(1 / temperatureCapacityFactor("flooded", c) - fit(c))).toBeLessThan(0.02);
    }
    // Above 25 °C no gain is credited (memory and the fit disagree there by up to 0.05).
    expect(temperatureCapacityFactor("flooded", 40)).toBe(1);
    // At 25 °C the factor is 1; LiFePO4 unaffected in this model.
    expect(temperatureCapacityFactor("agm", 25)).toBe(1);
    expect(temperatureCapacityFactor("lifepo4", -5)).toBe(1);
    // At 10 °C (50 °F) the factor 1.19 means capacity 1/1.19 = 84 %.
    expect(bankCapacityAh(flooded12, 10)).toBeCloseTo(100 / 1.19, 6);
  });
});
