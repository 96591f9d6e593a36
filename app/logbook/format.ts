import type { LocalReading } from "~/offline/db.client";

export const fmt = (n: number | null, digits: number, unit: string) => (n === null || n === undefined ? "—" : `${n.toFixed(digits)} ${unit}`);

export function fmtCurrent(a: number | null) {
  if (a === null || a === undefined) return "—";
  if (a === 0) return "0.0 A";
  return `${a > 0 ? "+" : "−"}${Math.abs(a).toFixed(1)} A`;
}

export function currentWords(a: number | null) {
  if (a === null || a === undefined) return "";
  return a > 0 ? "charging" : a < 0 ? "discharging" : "at rest";
}

const dateTime = new Intl.DateTimeFormat(undefined, { dateStyle: "medium", timeStyle: "short" });
export const fmtTime = (ms: number) => dateTime.format(new Date(ms));

export const sourceLabel: Record<LocalReading["source"], string> = { hand: "By hand", csv: "CSV import", device: "Device" };
