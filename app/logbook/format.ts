/** How the logbook writes its values (the person's units; times through ~/lib/datetime). */
import type { LocalReading } from "~/offline/db.client";
import { formatTemperature, type UnitPrefs } from "~/lib/units";

const MINUS = "\u2212";

export const fmt = (n: number | null | undefined, digits: number, unit: string) => (n === null || n === undefined ? "—" : `${n < 0 ? MINUS : ""}${Math.abs(n).toFixed(digits)} ${unit}`);

export function fmtCurrent(a: number | null | undefined) {
  if (a === null || a === undefined) return "—";
  if (a === 0) return "0.0 A";
  return `${a > 0 ? "+" : MINUS}${Math.abs(a).toFixed(1)} A`;
}

export function currentWords(a: number | null) {
  if (a === null || a === undefined) return "";
  return a > 0 ? "charging" : a < 0 ? "discharging" : "at rest";
}

export const fmtTemperature = (c: number | null | undefined, units: UnitPrefs) => formatTemperature(c, units.temperatureUnit);

export const sourceLabel: Record<LocalReading["source"], string> = { hand: "By hand", csv: "CSV import", device: "Device" };

/** "1 reading", "2 readings": counts that agree with their noun. */
export function count(n: number, one: string, many = `${one}s`): string {
  return `${n.toLocaleString("en-GB")} ${n === 1 ? one : many}`;
}
