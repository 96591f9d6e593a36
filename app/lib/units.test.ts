import { describe, expect, test } from "vitest";
import { awgToMm2, formatCableSize, formatLength, formatTemperature, fromTemperature, mm2ToAwg } from "./units";

describe("Display units from the person's choice", () => {
  test("temperatures: water freezes at 32 °F and boils at 212 °F; −40 is the same on both scales (NIST SP 811)", () => {
    expect(formatTemperature(0, "f")).toBe("32 °F");
    expect(formatTemperature(100, "f")).toBe("212 °F");
    expect(formatTemperature(-40, "f")).toBe("\u221240 °F");
    expect(formatTemperature(14, "c")).toBe("14 °C");
    expect(fromTemperature(57.2, "f")).toBeCloseTo(14, 10);
    expect(formatTemperature(null, "f")).toBe("—");
  });

  test("lengths: 1 ft is exactly 0.3048 m (NIST SP 811)", () => {
    expect(formatLength(3.048, "imperial")).toBe("10.0 ft");
    expect(formatLength(3.048, "metric")).toBe("3.05 m");
  });

  test("cable sizes: AWG 10 is 5.26 mm², AWG 4 is 21.2 mm², AWG 0 is 53.5 mm² (ASTM B258 table)", () => {
    expect(awgToMm2(10)).toBeCloseTo(5.26, 2);
    expect(awgToMm2(4)).toBeCloseTo(21.2, 1);
    expect(awgToMm2(0)).toBeCloseTo(53.5, 1);
    // Never a thinner cable than the one in the model: 25 mm² needs 3 AWG (26.7 mm²).
    expect(mm2ToAwg(25)).toBe("3 AWG");
    expect(formatCableSize(16, "awg")).toBe("5 AWG");
    expect(formatCableSize(16, "mm2")).toBe("16 mm²");
  });
});
