import { describe, expect, it } from "vitest";
import { estimateCapacity, type LogReading } from "./capacity";
import type { Bank } from "./model";

const flooded: Bank = {
  id: "f", name: "Flooded bank", role: "house", chemistry: "flooded", ratedAh: 200, batteryNominalV: 12, seriesCount: 1,
  parallelCount: 1, usableFloorSocPct: 50, lowVoltageCutoffV: 11.5, chargeEfficiencyPct: 85,
  ports: [{ id: "main", name: "Main", role: "common", lowVoltageProtected: false, chargeProtected: false, contactor: false }],
};

describe("capacity from the logbook", () => {
  it("counts amp-hours between two resting voltages (worked example, ours, on the BCI table)", () => {
    // Rest at 12.65 V (100 % on the BCI table), discharge 8 A for 10 h = 80 Ah, rest at 12.24 V (50 %).
    // Capacity = 80 Ah / 0.50 = 160 Ah = 80 % of the rated 200 Ah.
    const t0 = Date.UTC(2026, 9, 1, 6);
    const rs: LogReading[] = [{ atMs: t0, restingV: 12.65, currentA: 0 }];
    for (let m = 10; m <= 600; m += 10) rs.push({ atMs: t0 + m * 60000, currentA: -8 });
    rs.push({ atMs: t0 + 601 * 60000, currentA: 0 });
    rs.push({ atMs: t0 + 602 * 60000, currentA: 0, restingV: 12.24 });
    const e = estimateCapacity(flooded, rs);
    expect(e.ok).toBe(true);
    // The first 10-minute interval ramps 0 → −8 A (trapezoid): 80 − 8 × (5/60) + the 1-minute ramp back = 79.4 Ah
    expect(e.countedAh!).toBeCloseTo(-(80 - 8 * (5 / 60) + 8 * (0.5 / 60)), 6);
    expect(e.capacityAh!).toBeCloseTo(Math.abs(e.countedAh!) / 0.5, 6);
    expect(e.healthPct!).toBeCloseTo(79.4, 6); // 79.4 / 0.5 / 200
    expect(e.confidence).toBe("high");
  });

  it("does not trust LiFePO4 resting voltages on the flat part, or a monitor's own SoC", () => {
    const lfp: Bank = { ...flooded, chemistry: "lifepo4", batteryNominalV: 12.8, ratedAh: 100 };
    const t0 = Date.UTC(2026, 9, 1);
    const rs: LogReading[] = [
      { atMs: t0, restingV: 13.3, currentA: 0, socPct: 80 },
      { atMs: t0 + 3600000, currentA: -20, socPct: 60 },
      { atMs: t0 + 7200000, restingV: 13.2, currentA: 0, socPct: 40 },
    ];
    const e = estimateCapacity(lfp, rs);
    expect(e.ok).toBe(false);
    expect(e.note).toMatch(/trusted SoC points/);
  });

  it("uses a full charge as a trusted point and counts charge through the charge efficiency", () => {
    // From 50 % (12.24 V at rest) charge 20 A for 5 h = 100 Ah × 0.85 = 85 Ah stored → full.
    // Capacity = 85 / 0.5 = 170 Ah.
    const t0 = Date.UTC(2026, 9, 2);
    const rs: LogReading[] = [{ atMs: t0, restingV: 12.24, currentA: 20 }];
    for (let m = 5; m <= 300; m += 5) rs.push({ atMs: t0 + m * 60000, currentA: 20, ...(m === 300 ? { fullCharge: true } : {}) });
    const e = estimateCapacity(flooded, rs);
    expect(e.capacityAh!).toBeCloseTo(170, 6);
  });
});
