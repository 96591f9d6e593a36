/**
 * CSV import of a battery monitor's export: any CSV with a header row. The person maps columns
 * to our fields (we guess from the header words and the values), units are detected (mV/V,
 * mA/A, fraction/percent SoC, °F/°C, kWh/Wh) and can be overridden, each row is checked, and
 * rows already in the logbook (same time) are skipped. A reading's id is derived from the rig
 * and its time, so importing the same file twice never doubles a reading, on the phone or on
 * the server.
 */
import { newReadingSchema, READING_VALUE_KEYS, type NewReading, type ReadingValueKey } from "~/schemas/readings";
import { fromLocal } from "~/lib/datetime";
import { parseDecimal } from "~/lib/numbers";

export type Field = "takenAt" | ReadingValueKey | "note";
export const FIELDS: Array<{ field: Field; label: string }> = [
  { field: "takenAt", label: "Time" },
  { field: "bankVoltageV", label: "Bank voltage" },
  { field: "currentA", label: "Current" },
  { field: "socPct", label: "State of charge" },
  { field: "temperatureC", label: "Temperature" },
  { field: "solarWhToday", label: "Solar today" },
  { field: "note", label: "Note" },
];

export type Mapping = Partial<Record<Field, number>>;
export type Units = {
  voltage: "V" | "mV";
  current: "A" | "mA";
  soc: "pct" | "fraction";
  temperature: "C" | "F" | "K";
  solar: "Wh" | "kWh";
  /** The monitor shows discharge as positive: flip the sign to ours (+ charging). */
  invertCurrent: boolean;
  time: TimeFormat;
};
export type TimeFormat = "iso" | "epoch-s" | "epoch-ms" | "dmy" | "mdy" | "ymd";

const WORDS: Array<[Field, RegExp]> = [
  ["takenAt", /\b(time|timestamp|date|datetime|when|taken)\b/i],
  ["bankVoltageV", /\b(volt|voltage|vbat|v_?bat|battery v|bank v|u)\b|\(m?v\)|\bm?v\b/i],
  ["currentA", /\b(current|amps?|ibat|i_?bat|i)\b|\(m?a\)|\bm?a\b/i],
  ["socPct", /\b(soc|state of charge|charge state|level)\b/i],
  ["temperatureC", /\b(temp|temperature)\b|°[cf]|\bdeg/i],
  ["solarWhToday", /\b(solar|pv|yield|harvest)\b/i],
  ["note", /\b(note|comment|remark|memo)\b/i],
];

/** Guesses which column holds which field from the header words. */
export function guessMapping(headers: string[]): Mapping {
  const mapping: Mapping = {};
  const used = new Set<number>();
  for (const [field, re] of WORDS) {
    const i = headers.findIndex((h, idx) => !used.has(idx) && re.test(h.replace(/[_-]/g, " ")));
    if (i >= 0) {
      mapping[field] = i;
      used.add(i);
    }
  }
  return mapping;
}

const num = (s: string | undefined) => {
  const n = parseDecimal(s);
  return n === "bad" ? null : n;
};

function median(values: number[]): number | null {
  if (!values.length) return null;
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

/** Detects units from the header text first, then from the size of the values. */
export function detectUnits(headers: string[], rows: string[][], mapping: Mapping): Units {
  const col = (f: Field) => (mapping[f] === undefined ? [] : rows.map((r) => num(r[mapping[f]!])).filter((n): n is number => n !== null));
  const head = (f: Field) => (mapping[f] === undefined ? "" : (headers[mapping[f]!] ?? ""));
  const v = median(col("bankVoltageV").map(Math.abs));
  const a = col("currentA").map(Math.abs);
  const soc = col("socPct");
  const t = median(col("temperatureC"));
  const units: Units = {
    voltage: /\bmv\b|\(mv\)/i.test(head("bankVoltageV")) || (v !== null && v > 100) ? "mV" : "V",
    current: /\bma\b|\(ma\)/i.test(head("currentA")) || (a.length > 0 && Math.max(...a) > 2000) ? "mA" : "A",
    soc: /%|pct|percent/i.test(head("socPct")) ? "pct" : soc.length > 0 && soc.every((x) => x >= 0 && x <= 1) && soc.some((x) => x > 0 && x < 1) ? "fraction" : "pct",
    temperature: /°?f\b|\(f\)|fahrenheit/i.test(head("temperatureC")) ? "F" : /\bk\b|\(k\)|kelvin/i.test(head("temperatureC")) ? "K" : t !== null && t > 200 ? "K" : "C",
    solar: /kwh/i.test(head("solarWhToday")) ? "kWh" : "Wh",
    invertCurrent: /discharg/i.test(head("currentA")),
    time: detectTimeFormat(mapping.takenAt === undefined ? [] : rows.map((r) => r[mapping.takenAt!] ?? "")),
  };
  return units;
}

export function detectTimeFormat(samples: string[]): TimeFormat {
  const s = samples.map((x) => x.trim()).filter(Boolean).slice(0, 200);
  if (!s.length) return "iso";
  // The format most samples fit wins (a few bad rows must not change the reading of the rest).
  const share = (re: RegExp) => s.filter((x) => re.test(x)).length / s.length;
  const scored: Array<[TimeFormat | "dm", number]> = [
    ["epoch-ms", share(/^\d{13}$/)],
    ["epoch-s", share(/^\d{9,10}(\.\d+)?$/)],
    ["iso", share(/^\d{4}-\d{2}-\d{2}[T ]\d{1,2}:\d{2}/)],
    ["ymd", share(/^\d{4}[/.]\d{1,2}[/.]\d{1,2}/)],
    ["dm", share(/^\d{1,2}[/.-]\d{1,2}[/.-]\d{2,4}/)],
  ];
  const [best] = scored.sort((a, b) => b[1] - a[1])[0]!;
  if (best !== "dm") return best;
  const firsts = s.map((x) => /^(\d{1,2})[/.-](\d{1,2})[/.-]\d{2,4}/.exec(x)).filter((m): m is RegExpExecArray => m !== null);
  if (firsts.some((m) => Number(m[1]) > 12)) return "dmy";
  if (firsts.some((m) => Number(m[2]) > 12)) return "mdy";
  // Ambiguous (every day ≤ 12): day first; the person can change it in the preview.
  return "dmy";
}

/**
 * Parses one time cell. A time with no zone written in it is read in `timeZone` (the rig's),
 * with date-fns, so a file written on the rig means the rig's clock whatever the phone's zone.
 */
export function parseTime(text: string, format: TimeFormat, timeZone: string): number | null {
  const x = text.trim();
  if (!x) return null;
  if (format === "epoch-ms") return /^\d+$/.test(x) ? Number(x) : null;
  if (format === "epoch-s") return /^\d+(\.\d+)?$/.test(x) ? Math.round(Number(x) * 1000) : null;
  if (format === "iso") {
    const withT = x.replace(" ", "T");
    if (/[zZ]|[+-]\d{2}:?\d{2}$/.test(withT)) {
      const ms = Date.parse(withT);
      return isNaN(ms) ? null : ms;
    }
    const m = /^(\d{4}-\d{2}-\d{2})T(\d{1,2}):(\d{2})(?::(\d{2}))?/.exec(withT);
    return m ? fromLocal(`${m[1]} ${m[2]!.padStart(2, "0")}:${m[3]}:${m[4] ?? "00"}`, timeZone, "yyyy-MM-dd HH:mm:ss") : null;
  }
  const m = /^(\d{1,4})[/.-](\d{1,2})[/.-](\d{1,4})(?:[ T,]+(\d{1,2}):(\d{2})(?::(\d{2}))?\s*(am|pm)?)?$/i.exec(x);
  if (!m) return null;
  let [y, mo, d] = [0, 0, 0];
  if (format === "ymd") [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  else if (format === "dmy") [d, mo, y] = [Number(m[1]), Number(m[2]), Number(m[3])];
  else [mo, d, y] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (y < 100) y += 2000;
  let h = Number(m[4] ?? 0);
  if (m[7]) h = (h % 12) + (/pm/i.test(m[7]) ? 12 : 0);
  const two = (n: number | string) => String(n).padStart(2, "0");
  return fromLocal(`${y}-${two(mo)}-${two(d)} ${two(h)}:${two(m[5] ?? 0)}:${two(m[6] ?? 0)}`, timeZone, "yyyy-MM-dd HH:mm:ss");
}

export function toOurUnits(field: ReadingValueKey, value: number, units: Units): number {
  switch (field) {
    case "bankVoltageV":
      return units.voltage === "mV" ? value / 1000 : value;
    case "currentA": {
      const a = units.current === "mA" ? value / 1000 : value;
      return units.invertCurrent ? -a : a;
    }
    case "socPct":
      return units.soc === "fraction" ? value * 100 : value;
    case "temperatureC":
      return units.temperature === "F" ? ((value - 32) * 5) / 9 : units.temperature === "K" ? value - 273.15 : value;
    case "solarWhToday":
      return units.solar === "kWh" ? value * 1000 : value;
  }
}

/** A stable reading id from the rig and the time: the same row imported twice has one id. */
export async function readingIdFor(rigId: string, takenAtMs: number): Promise<string> {
  const bytes = new Uint8Array(await crypto.subtle.digest("SHA-256", new TextEncoder().encode(`tilldawn-csv:${rigId}:${takenAtMs}`))).slice(0, 16);
  bytes[6] = (bytes[6]! & 0x0f) | 0x80; // version 8 (custom)
  bytes[8] = (bytes[8]! & 0x3f) | 0x80; // RFC 4122 variant
  const hex = [...bytes].map((b) => b.toString(16).padStart(2, "0")).join("");
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}

export type RowError = { row: number; message: string };
/**
 * `duplicates`: rows whose time is already in the logbook; `repeated`: rows whose time came
 * earlier in the same file (the first one is kept).
 */
export type Converted = { readings: NewReading[]; errors: RowError[]; duplicates: number; repeated: number };

/**
 * Turns data rows into readings. `row` numbers in errors count the header as row 1, as a
 * spreadsheet shows them. `existing` holds times (ms) already in the logbook.
 */
export async function convertRows(rigId: string, rows: string[][], mapping: Mapping, units: Units, existing: Set<number>, timeZone: string): Promise<Converted> {
  const readings: NewReading[] = [];
  const errors: RowError[] = [];
  const seen = new Set<number>();
  let duplicates = 0;
  let repeated = 0;
  if (mapping.takenAt === undefined) return { readings, errors: [{ row: 1, message: "Choose the column that holds the time." }], duplicates, repeated };
  for (let i = 0; i < rows.length; i++) {
    const cells = rows[i]!;
    const rowNo = i + 2;
    if (cells.every((c) => c.trim() === "")) continue;
    const at = parseTime(cells[mapping.takenAt] ?? "", units.time, timeZone);
    if (at === null) {
      errors.push({ row: rowNo, message: `The time "${cells[mapping.takenAt] ?? ""}" could not be read.` });
      continue;
    }
    if (existing.has(at)) {
      duplicates++;
      continue;
    }
    if (seen.has(at)) {
      repeated++;
      continue;
    }
    const values: Partial<Record<ReadingValueKey, number | null>> = {};
    let bad = "";
    for (const field of READING_VALUE_KEYS) {
      const idx = mapping[field];
      if (idx === undefined) continue;
      const raw = cells[idx] ?? "";
      if (raw.trim() === "") {
        values[field] = null;
        continue;
      }
      const n = num(raw);
      if (n === null) {
        bad = `"${raw}" is not a number (${FIELDS.find((f) => f.field === field)!.label}).`;
        break;
      }
      values[field] = Math.round(toOurUnits(field, n, units) * 10_000) / 10_000;
    }
    if (bad) {
      errors.push({ row: rowNo, message: bad });
      continue;
    }
    const candidate = {
      id: await readingIdFor(rigId, at),
      takenAt: new Date(at).toISOString(),
      source: "csv" as const,
      note: mapping.note === undefined ? "" : (cells[mapping.note] ?? "").slice(0, 500),
      ...values,
    };
    const checked = newReadingSchema.safeParse(candidate);
    if (!checked.success) {
      errors.push({ row: rowNo, message: checked.error.issues[0]?.message ?? "This row is not a valid reading." });
      continue;
    }
    seen.add(at);
    readings.push(checked.data);
  }
  return { readings, errors, duplicates, repeated };
}
