import { describe, expect, it } from "vitest";
import {
  ampacityA, awgCircularMils, checkProtection, conductorResistanceOhmPerM, resistanceFromResistivityOhmPerM,
  suggestCable, voltageDrop, awgAreaMm2,
} from "./cable";

const awg = (a: "18" | "16" | "14" | "12" | "10" | "8" | "6" | "4" | "2" | "1/0" | "2/0" | "4/0") => ({ unit: "awg", awg: a }) as const;
const mm2 = (x: number) => ({ unit: "mm2", mm2: x }) as const;
const perKft = (ohmPerM: number) => ohmPerM * 304.8;

describe("conductor resistance", () => {
  it("reproduces NEC Chapter 9 Table 8, stranded copper at 75 °C (secondary)", () => {
    const table: [Parameters<typeof awg>[0], number][] = [
      ["18", 7.95], ["16", 4.99], ["14", 3.14], ["12", 1.98], ["10", 1.24], ["8", 0.778], ["6", 0.491],
      ["4", 0.308], ["2", 0.194], ["1/0", 0.122], ["2/0", 0.0967], ["4/0", 0.0608],
    ];
    for (const [size, ohmKft] of table) expect(perKft(conductorResistanceOhmPerM(awg(size), 75))).toBeCloseTo(ohmKft, 6);
  });

  it("corrects for temperature with the table's note, α = 0.00323", () => {
    // 12 AWG at 20 °C: 1.98 × (1 + 0.00323 × (20 − 75)) = 1.98 × 0.82235 = 1.6283 Ω/kft
    expect(perKft(conductorResistanceOhmPerM(awg("12"), 20))).toBeCloseTo(1.6283, 4);
  });

  it("ASTM B258 diameters give NEC Table 8 circular mils (secondary)", () => {
    // NEC Table 8: 12 AWG 6,530; 10 AWG 10,380; 8 AWG 16,510; 4 AWG 41,740 cmil.
    for (const [size, cmil] of [["12", 6530], ["10", 10380], ["8", 16510], ["4", 41740]] as const) {
      expect(Math.abs(awgCircularMils(size) / cmil - 1)).toBeLessThan(0.003);
    }
  });

  it("resistivity (IEC 60028) matches NEC Table 8's SOLID 12 AWG, and stranded sits 2–4 % higher", () => {
    // ρ20 = 0.017241 Ω·mm²/m, α20 = 0.00393 (secondary). 12 AWG = 3.309 mm².
    // At 75 °C: 0.017241 × (1 + 0.00393 × 55) / 3.309 = 6.337 mΩ/m = 1.931 Ω/kft; NEC solid 12 AWG: 1.93.
    const rho = perKft(resistanceFromResistivityOhmPerM(awgAreaMm2("12"), 75));
    expect(rho).toBeCloseTo(1.93, 2);
    for (const size of ["14", "12", "10", "8", "6", "4", "2"] as const) {
      const ratio = conductorResistanceOhmPerM(awg(size), 75) / conductorResistanceOhmPerM(awg(size), 75, "resistivity");
      expect(ratio).toBeGreaterThan(1.0);
      expect(ratio).toBeLessThan(1.05);
    }
  });

  it("reproduces IEC 60228 class 5 at 20 °C (secondary) and corrects with α20", () => {
    for (const [a, ohmKm] of [[0.75, 26.0], [1, 19.5], [1.5, 13.3], [2.5, 7.98], [4, 4.95], [6, 3.3], [10, 1.91], [16, 1.21], [50, 0.386], [70, 0.272], [95, 0.206], [120, 0.161]] as const) {
      expect(conductorResistanceOhmPerM(mm2(a), 20) * 1000).toBeCloseTo(ohmKm, 6);
    }
    // 2.5 mm² at 70 °C: 7.98 × (1 + 0.00393 × 50) = 9.548 Ω/km
    expect(conductorResistanceOhmPerM(mm2(2.5), 70) * 1000).toBeCloseTo(9.548, 3);
    // Class 5 maxima sit above the pure-resistivity value (stranding, tolerance): 7.98 vs 6.90.
    expect(resistanceFromResistivityOhmPerM(2.5, 20) * 1000).toBeCloseTo(6.896, 3);
  });
});

describe("voltage drop", () => {
  it("worked example (ours): 10 A on 5 m of 12 AWG at 12 V", () => {
    // At 75 °C: R = 1.98 Ω/kft / 304.8 × 2 × 5 m = 0.06496 Ω; 10 A → 0.6496 V = 5.41 % > 3 % critical.
    const vd = voltageDrop(awg("12"), 5, 10, 12, "critical", 75);
    expect(vd.resistanceOhm).toBeCloseTo(0.06496, 5);
    expect(vd.dropV).toBeCloseTo(0.6496, 4);
    expect(vd.dropPct).toBeCloseTo(5.413, 3);
    expect(vd.ok).toBe(false);
    expect(voltageDrop(awg("12"), 5, 10, 12, "normal", 75).ok).toBe(true); // 10 % limit
  });

  it("suggests the size the ABYC circular-mil formula gives (secondary, K = 10.75)", () => {
    // ABYC E-11 practice (secondary/memory): CM = K × I × L / E, K = 10.75 Ω·cmil/ft, L round trip in ft.
    // 10 A, 5 m one way (32.81 ft round trip), 3 % of 12 V = 0.36 V → CM = 10.75 × 10 × 32.81 / 0.36 = 9,797 → 10 AWG (10,380 cmil).
    const cm = (10.75 * 10 * ((2 * 5) / 0.3048)) / 0.36;
    expect(cm).toBeCloseTo(9797, -1);
    const s = suggestCable({ currentA: 10, lengthM: 5, nominalV: 12, criticality: "critical", continuous: false });
    expect(s?.size).toEqual(awg("10"));
    expect(awgCircularMils("10")).toBeGreaterThan(cm);
    expect(awgCircularMils("12")).toBeLessThan(cm);
  });
});

describe("ampacity and protection", () => {
  it("reads 33 CFR 183.425 Table 5 (published) and applies the engine-space factor (memory)", () => {
    expect(ampacityA(awg("10"), 105, false).ampacityA).toBe(60);
    expect(ampacityA(awg("16"), 60, false).ampacityA).toBe(15);
    expect(ampacityA(awg("4"), 90, false).ampacityA).toBe(135);
    expect(ampacityA(awg("1/0"), 200, false).ampacityA).toBe(325);
    expect(ampacityA(awg("10"), 105, true).ampacityA).toBeCloseTo(60 * 0.86, 9);
    // A metric size between two rows: 6 mm² lies between 10 AWG (5.26 mm²) and 8 AWG (8.37 mm²).
    const a6 = ampacityA(mm2(6), 105, false).ampacityA;
    expect(a6).toBeGreaterThan(60);
    expect(a6).toBeLessThan(80);
  });

  it("reads NEC 310.16 copper at 60/75/90 °C (2023 edition, secondary)", () => {
    const rows = [["14", 15, 20, 25], ["12", 20, 25, 30], ["10", 30, 35, 40], ["8", 40, 50, 55], ["6", 55, 65, 75], ["4", 70, 85, 95], ["2", 95, 115, 130]] as const;
    for (const [size, a60, a75, a90] of rows) {
      expect(ampacityA(awg(size), 60, false, "nec").ampacityA).toBe(a60);
      expect(ampacityA(awg(size), 75, false, "nec").ampacityA).toBe(a75);
      expect(ampacityA(awg(size), 90, false, "nec").ampacityA).toBe(a90);
    }
    // Ratings above 90 °C fall back to the 90 °C column.
    expect(ampacityA(awg("10"), 105, false, "nec").ampacityA).toBe(40);
  });

  it("NEC 210.20(A): a 16 A continuous load needs at least a 20 A device", () => {
    const c = checkProtection(20, 16, 0, awg("12"), 45);
    expect(c.requiredMinA).toBe(20);
    expect(c.coversLoad).toBe(true);
    expect(checkProtection(15, 16, 0, awg("12"), 45).coversLoad).toBe(false);
  });

  it("NEC 240.4(D): 14 AWG at most 15 A, 12 AWG 20 A, 10 AWG 30 A", () => {
    expect(checkProtection(20, 5, 0, awg("14"), 35).protectsConductor).toBe(false);
    expect(checkProtection(15, 5, 0, awg("14"), 35).protectsConductor).toBe(true);
    expect(checkProtection(20, 5, 0, awg("12"), 45).protectsConductor).toBe(true);
    expect(checkProtection(35, 5, 0, awg("10"), 60).maxForConductorA).toBe(30);
  });

  it("suggests a size and fuse for a continuous load (worked example, ours)", () => {
    // 20 A continuous → design 25 A. 14 AWG and 12 AWG are capped at 15/20 A by 240.4(D) → 10 AWG with 25 A.
    // Drop on 10 AWG, 3 m at 30 °C: 1.24/304.8 × (1 − 0.00323 × 45) × 6 m × 20 A = 0.417 V = 3.26 % of 12.8 V.
    const s = suggestCable({ currentA: 20, lengthM: 3, nominalV: 12.8, criticality: "normal", continuous: true });
    expect(s?.size).toEqual(awg("10"));
    expect(s?.fuseA).toBe(25);
    expect(s?.dropPct).toBeCloseTo(3.26, 2);
    const metric = suggestCable({ currentA: 20, lengthM: 3, nominalV: 12.8, criticality: "critical", continuous: true, unit: "mm2" });
    expect(metric?.size.unit).toBe("mm2");
    expect(metric!.dropPct).toBeLessThanOrEqual(3);
  });
});
