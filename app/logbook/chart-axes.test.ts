import { describe, expect, test } from "vitest";
import { decimalsFor, tickLabels, timeRange, voltageRange } from "./chart-axes";

describe("The logbook chart's axes", () => {
  test("one reading spans two hours of time, not years", () => {
    const t = Date.parse("2025-10-12T19:00:00Z") / 1000;
    expect(timeRange(t, t)).toEqual([t - 3600, t + 3600]);
    expect(timeRange(t, t + 86_400)).toEqual([t, t + 86_400]);
  });

  test("the voltage axis hugs the readings instead of starting at 0 V", () => {
    expect(voltageRange(13.21, 13.21)).toEqual([12.97, 13.45]);
    const [lo, hi] = voltageRange(12.4, 13.6);
    expect(lo).toBeCloseTo(12.28, 5);
    expect(hi).toBeCloseTo(13.72, 5);
  });

  test("ticks 0.05 V apart read 13.20, 13.25, 13.30: never the same label twice", () => {
    expect(decimalsFor(0.05)).toBe(2);
    expect(decimalsFor(0.2)).toBe(1);
    expect(decimalsFor(1)).toBe(0);
    const labels = tickLabels([13.2, 13.25, 13.3, 13.35]);
    expect(labels).toEqual(["13.20", "13.25", "13.30", "13.35"]);
    expect(new Set(tickLabels([13.28, 13.29, 13.3, 13.31])).size).toBe(4);
    expect(tickLabels([12, 13, 14])).toEqual(["12.0", "13.0", "14.0"]);
  });
});
