import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { autonomy } from "./autonomy";
import { buildCircuitGraph } from "./circuit-graph";
import { computeBudget } from "./draw";

describe("days of autonomy (worked example, ours)", () => {
  const g = buildCircuitGraph(juniperModel);
  it("Juniper in Storage", () => {
    const b = computeBudget(juniperModel, g, { modeId: "storage" });
    const a = autonomy(juniperModel, g, b, "house", { dateTime: "2026-10-15T12:00:00-06:00" });
    // House bank in Storage: alarm 12 + heater standby 4.8 + electronics 14.4 = 31.2 Wh/day.
    // Usable from full: 300 Ah × 85 % × 12.8 V = 3,264 Wh → 3,264 / 31.2 = 104.6 days without charge.
    expect(a.dailyDrawWh).toBeCloseTo(31.2, 9);
    expect(a.usableWh).toBeCloseTo(3264, 9);
    expect(a.daysNoCharge!).toBeCloseTo(104.6, 1);
    // Typical October sun more than covers 31 Wh/day.
    expect(a.daysWithTypicalSun).toBeNull();
    // Sizing for 3 days: 93.6 Wh / 12.8 V / 0.85 = 8.6 Ah.
    expect(a.sizing.requiredRatedAh).toBeCloseTo(93.6 / 12.8 / 0.85, 6);
  });

  it("Juniper Parked night without and with typical sun", () => {
    const b = computeBudget(juniperModel, g, { modeId: "parked-night" });
    const a = autonomy(juniperModel, g, b, "house", { dateTime: "2026-10-15T12:00:00-06:00" });
    // 3,264 Wh / 2,779.6 Wh per day = 1.17 days.
    expect(a.daysNoCharge!).toBeCloseTo(3264 / 2779.6, 6);
    expect(a.typicalSolarWhPerDay).toBeGreaterThan(500);
    expect(a.daysWithTypicalSun!).toBeCloseTo(3264 / (2779.6 - 0.97 * a.typicalSolarWhPerDay), 6);
    expect(a.daysWithTypicalSun!).toBeGreaterThan(a.daysNoCharge!);
  });
});
