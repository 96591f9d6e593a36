/** Display formatting for the Now screen (no arithmetic beyond unit conversion for display). */

const MINUS = "\u2212";

/** A number and its unit never part at a line end. */
const NBSP = "\u00a0";

/** 29.42 → "29 h 25 m"; 0.5 → "30 m"; null → "more than 72 h" (no-break spaces before units). */
export function formatDuration(hours: number | null, horizonH = 72): string {
  if (hours === null) return `more than ${horizonH}${NBSP}h`;
  const totalMin = Math.round(Math.abs(hours) * 60);
  const h = Math.floor(totalMin / 60);
  const m = totalMin % 60;
  if (h === 0) return `${m}${NBSP}m`;
  if (h >= 24 && m === 0) return `${h}${NBSP}h`;
  return `${h}${NBSP}h ${String(m).padStart(2, "0")}${NBSP}m`;
}

/** 1.04 → "1.0 days", 0.26 → "6 h" (short spans read better in hours). */
export function formatDays(days: number): string {
  if (days < 1) return formatDuration(days * 24);
  return `${days.toFixed(days < 10 ? 1 : 0)}${NBSP}days`;
}

/**
 * What a load is worth in days of autonomy with no charging: the full bank's usable energy over
 * the day's draw, with the load against without it (usableWh / (total − load) − usableWh / total
 * for a load that is on; for one that is off, what adding its Wh/day would take away).
 * Null when the rest of the rig draws nothing (autonomy without the load has no end).
 */
export function autonomyDaysCost(usableWh: number, totalWhPerDay: number, loadWhPerDay: number, on: boolean): number | null {
  const withLoad = on ? totalWhPerDay : totalWhPerDay + loadWhPerDay;
  const without = withLoad - loadWhPerDay;
  if (without <= 0 || withLoad <= 0) return null;
  return usableWh / without - usableWh / withLoad;
}

/** Signed runway change: −1.67 → "−1 h 40 m", 0.5 → "+30 m", tiny → "±0 m". */
export function formatDelta(hours: number): string {
  if (Math.round(Math.abs(hours) * 60) === 0) return `±0${NBSP}m`;
  return `${hours < 0 ? MINUS : "+"}${formatDuration(Math.abs(hours))}`;
}

export function formatW(w: number): string {
  const a = Math.abs(w);
  const s = a >= 100 ? Math.round(a).toString() : a >= 10 ? a.toFixed(0) : a.toFixed(1);
  return `${w < 0 ? MINUS : ""}${s} W`;
}

export function formatA(a: number): string {
  const x = Math.abs(a);
  return `${a < 0 ? MINUS : ""}${x >= 10 ? x.toFixed(1) : x.toFixed(2)} A`;
}

export function formatPct(p: number, digits = 0): string {
  return `${p.toFixed(digits)} %`;
}

export function formatWh(wh: number): string {
  return wh >= 1000 ? `${(wh / 1000).toFixed(2)}${NBSP}kWh` : `${Math.round(wh)}${NBSP}Wh`;
}

const timeFormats = new Map<string, Intl.DateTimeFormat>();
function fmt(timeZone: string, withDay: boolean): Intl.DateTimeFormat {
  const key = `${timeZone}|${withDay}`;
  let f = timeFormats.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat("en-GB", {
      timeZone,
      hour: "2-digit",
      minute: "2-digit",
      hourCycle: "h23",
      ...(withDay ? { weekday: "short" } : {}),
    });
    timeFormats.set(key, f);
  }
  return f;
}

/** Local time in the rig's time zone: "Fri 07:15" (or "07:15"). */
export function formatClock(ms: number, timeZone: string, withDay = true): string {
  return fmt(timeZone, withDay).format(new Date(ms));
}

/** "just now", "12 min ago", "3 h ago", "2 days ago". */
export function formatAgo(ms: number, nowMs: number): string {
  const min = Math.max(0, Math.round((nowMs - ms) / 60_000));
  if (min < 1) return "just now";
  if (min < 60) return `${min} min ago`;
  const h = Math.round(min / 60);
  if (h < 48) return `${h} h ago`;
  return `${Math.round(h / 24)} days ago`;
}

/** "2026-10-15T19:30" in the rig's time zone, for a datetime-local input. */
export function toLocalInput(ms: number, timeZone: string): string {
  const parts = new Intl.DateTimeFormat("en-CA", {
    timeZone, year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit", hourCycle: "h23",
  }).formatToParts(new Date(ms));
  const g = (t: string) => parts.find((p) => p.type === t)?.value ?? "00";
  return `${g("year")}-${g("month")}-${g("day")}T${g("hour")}:${g("minute")}`;
}

/** The instant of a datetime-local value read in the rig's time zone. */
export function fromLocalInput(value: string, timeZone: string, utcOffsetMinutes: (ms: number, tz: string) => number): number | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(value);
  if (!m) return null;
  const asUtc = Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!, +m[4]!, +m[5]!);
  const first = asUtc - utcOffsetMinutes(asUtc, timeZone) * 60_000;
  return asUtc - utcOffsetMinutes(first, timeZone) * 60_000;
}
