/**
 * Display units from the person's preferences (Account → Units and display). The model and
 * the logbook keep SI values (°C, metres, mm²); these turn them into the person's units and
 * back. Conversion factors: °F = °C × 9/5 + 32 and 1 ft = 0.3048 m (exact, NIST SP 811,
 * appendix B); AWG diameters from ASTM B258: d(n) = 0.127 mm × 92^((36 − n)/39).
 */
export type UnitPrefs = { lengthUnit: "metric" | "imperial"; cableUnit: "awg" | "mm2"; temperatureUnit: "c" | "f" };
export const defaultUnits: UnitPrefs = { lengthUnit: "metric", cableUnit: "mm2", temperatureUnit: "c" };

const MINUS = "\u2212";
const signed = (n: number, digits: number) => `${n < 0 ? MINUS : ""}${Math.abs(n).toFixed(digits)}`;

export const cToF = (c: number) => (c * 9) / 5 + 32;
export const fToC = (f: number) => ((f - 32) * 5) / 9;

export const temperatureSymbol = (u: UnitPrefs["temperatureUnit"]) => (u === "f" ? "°F" : "°C");
/** °C → the person's unit. */
export const toTemperature = (c: number, u: UnitPrefs["temperatureUnit"]) => (u === "f" ? cToF(c) : c);
/** The person's unit → °C (what the logbook keeps). */
export const fromTemperature = (x: number, u: UnitPrefs["temperatureUnit"]) => (u === "f" ? fToC(x) : x);
export function formatTemperature(c: number | null | undefined, u: UnitPrefs["temperatureUnit"], digits = 0): string {
  if (c === null || c === undefined) return "—";
  return `${signed(toTemperature(c, u), digits)} ${temperatureSymbol(u)}`;
}

export const FOOT_M = 0.3048;
export function formatLength(m: number | null | undefined, u: UnitPrefs["lengthUnit"]): string {
  if (m === null || m === undefined) return "—";
  if (u === "imperial") return `${(m / FOOT_M).toFixed(1)} ft`;
  return `${m.toFixed(m < 10 ? 2 : 1)} m`;
}

/** Cross-section in mm² of an AWG gauge (0000 is −3, 000 is −2, 00 is −1, 0 is 0). */
export function awgToMm2(n: number): number {
  const d = 0.127 * Math.pow(92, (36 - n) / 39);
  return (Math.PI / 4) * d * d;
}
const awgName = (n: number) => (n <= 0 ? `${"0".repeat(1 - n)}` : String(n));
/** The smallest AWG gauge with at least this cross-section (never a thinner cable). */
export function mm2ToAwg(mm2: number): string | null {
  for (let n = 40; n >= -3; n--) if (awgToMm2(n) >= mm2 * 0.97) return `${awgName(n)} AWG`;
  return null;
}
export function formatCableSize(mm2: number | null | undefined, u: UnitPrefs["cableUnit"]): string {
  if (mm2 === null || mm2 === undefined) return "—";
  if (u === "awg") return mm2ToAwg(mm2) ?? `${mm2} mm² (larger than 0000 AWG)`;
  return `${mm2 % 1 === 0 ? mm2.toFixed(0) : mm2.toFixed(1)} mm²`;
}
