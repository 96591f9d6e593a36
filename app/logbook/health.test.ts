import { describe, expect, test } from "vitest";
import { healthTrend, toLogReadings } from "./health";
import { juniperModel } from "../../tests/fixtures/juniper";

const H = 3600_000;
const start = Date.UTC(2025, 9, 10, 0);

describe("Logbook readings as input to the capacity estimate", () => {
  test("a resting voltage is offered only after an hour within ±0.5 A, and at most once a day", () => {
    const rows = [0, 0.5, 1, 1.5, 2, 3].map((h, i) => ({ takenAt: start + h * H, currentA: i === 0 ? -5 : 0.2, bankVoltageV: 13.3, socPct: null }));
    const out = toLogReadings(rows);
    // Rest starts at 0.5 h; 1 h later (1.5 h) is the first trusted point; 2 h and 3 h are the same day.
    expect(out.map((r) => r.restingV !== undefined)).toEqual([false, false, false, true, false, false]);
    expect(out.every((r) => r.currentA !== undefined)).toBe(true);
  });

  test("a rested full bank, a measured discharge and a rested half-full bank give the true capacity", () => {
    // An invented flooded variant of Juniper's house bank (3 × 100 Ah). Resting voltages from
    // the Battery Council International table (12 V flooded, 80 °F): 12.65 V is 100 %, 12.24 V
    // is 50 %. Between them the log counts 100 Ah, so the true capacity is 100 / 0.5 = 200 Ah
    // (worked by hand), 67 % of the rated 300 Ah.
    const house = { ...juniperModel.banks[0]!, chemistry: "flooded" as const, peukertExponent: 1.25, chargeEfficiencyPct: 85 };
    const day = Date.UTC(2025, 9, 10, 18);
    const rows: { takenAt: number; currentA: number; bankVoltageV: number; socPct: null }[] = [];
    const at = (min: number) => day + min * 60_000;
    for (let m = 0; m <= 120; m += 15) rows.push({ takenAt: at(m), currentA: 0, bankVoltageV: 12.65, socPct: null });
    for (let m = 135; m <= 720; m += 15) rows.push({ takenAt: at(m), currentA: -10, bankVoltageV: 12.3, socPct: null });
    for (let m = 735; m <= 840; m += 15) rows.push({ takenAt: at(m), currentA: 0, bankVoltageV: 12.24, socPct: null });
    const trend = healthTrend(house, rows);
    expect(trend.map((p) => p.month)).toEqual(["2025-10"]);
    const e = trend[0]!.estimate;
    expect(e.ok).toBe(true);
    expect(e.socFromPct).toBeCloseTo(100, 5);
    expect(e.socToPct).toBeCloseTo(50, 5);
    expect(Math.abs(e.countedAh!)).toBeCloseTo(100, 5);
    expect(e.capacityAh).toBeCloseTo(200, 5);
    expect(e.healthPct).toBeCloseTo(66.7, 1);
  });

  test("on the flat part of a LiFePO4 curve, resting voltages give no estimate rather than a guess", () => {
    const house = juniperModel.banks[0]!;
    const rows: { takenAt: number; currentA: number; bankVoltageV: number; socPct: null }[] = [];
    for (let m = 0; m <= 90; m += 15) rows.push({ takenAt: start + m * 60_000, currentA: 0, bankVoltageV: 13.33, socPct: null });
    for (let m = 105; m <= 705; m += 15) rows.push({ takenAt: start + m * 60_000, currentA: -9, bankVoltageV: 13.1, socPct: null });
    for (let m = 720; m <= 24 * 60 + 120; m += 15) rows.push({ takenAt: start + m * 60_000, currentA: 0, bankVoltageV: 13.27, socPct: null });
    const e = healthTrend(house, rows)[0]!.estimate;
    expect(e.ok).toBe(false);
    expect(e.capacityAh).toBeNull();
    expect(e.note).toMatch(/two trusted SoC points/);
  });
});
