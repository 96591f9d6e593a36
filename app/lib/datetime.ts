/**
 * The one place the app turns instants into words and back. Every time is shown in the rig's
 * time zone (the model's `timeZone`), on the person's 12- or 24-hour clock, in one date style
 * ("Tue, 14 Oct 2025"). Formatting is `Intl.DateTimeFormat`; reading a typed local time in a
 * time zone is date-fns with @date-fns/tz (no hand-made offsets).
 *
 * The Now screen's components can adopt these in place of their own `formatClock`,
 * `toLocalInput` and `fromLocalInput` (app/components/now/format.ts).
 */
import { format, isValid, parse } from "date-fns";
import { TZDate, tz } from "@date-fns/tz";

export const CLOCKS = ["24h", "12h"] as const;
export type Clock = (typeof CLOCKS)[number];

/** Where and how a person reads times: the rig's zone and their clock. */
export type TimeSettings = { timeZone: string; clock: Clock };

/** Used before the rig's zone is known (a rig not yet opened on this phone). */
export function phoneTimeZone(): string {
  return Intl.DateTimeFormat().resolvedOptions().timeZone || "UTC";
}

// One locale for the date style, so "14 Oct 2025" reads the same on every phone.
const LOCALE = "en-GB";
const cache = new Map<string, Intl.DateTimeFormat>();
function formatter(kind: "date" | "time" | "dateTime" | "dayTime" | "short" | "dayMonth", s: TimeSettings): Intl.DateTimeFormat {
  const key = `${kind}|${s.timeZone}|${s.clock}`;
  let f = cache.get(key);
  if (f) return f;
  const clock: Intl.DateTimeFormatOptions = { hour: s.clock === "12h" ? "numeric" : "2-digit", minute: "2-digit", hourCycle: s.clock === "12h" ? "h12" : "h23" };
  const date: Intl.DateTimeFormatOptions = { weekday: "short", day: "numeric", month: "short", year: "numeric" };
  const options: Intl.DateTimeFormatOptions =
    kind === "date" ? date
    : kind === "time" ? clock
    : kind === "dayTime" ? { weekday: "short", ...clock }
    : kind === "short" ? { day: "numeric", month: "short", ...clock }
    : kind === "dayMonth" ? { day: "numeric", month: "short" }
    : { ...date, ...clock };
  f = new Intl.DateTimeFormat(LOCALE, { timeZone: s.timeZone, ...options });
  cache.set(key, f);
  return f;
}

// en-GB writes "8:22 pm"; the house style is "8:22 PM". Intl puts a narrow no-break space there.
const tidy = (text: string) => text.replace(/\s?([ap])m\b/g, (_m, x: string) => `\u202f${x.toUpperCase()}M`);

/** "Tue 14 Oct 2025" */
export const formatDate = (ms: number, s: TimeSettings) => formatter("date", s).format(new Date(ms));
/** "20:22" or "8:22 PM" */
export const formatTime = (ms: number, s: TimeSettings) => tidy(formatter("time", s).format(new Date(ms)));
/** "Tue, 14 Oct 2025, 20:22" */
export const formatDateTime = (ms: number, s: TimeSettings) => tidy(formatter("dateTime", s).format(new Date(ms)));
/** "Fri 07:15": a time within the next days. */
export const formatDayTime = (ms: number, s: TimeSettings) => tidy(formatter("dayTime", s).format(new Date(ms)));
/** "14 Oct, 20:22": chart legends and tight cells. */
export const formatShortDateTime = (ms: number, s: TimeSettings) => tidy(formatter("short", s).format(new Date(ms)));

/** "14 Oct": chart ticks a day or more apart. */
export const formatDayMonth = (ms: number, s: TimeSettings) => formatter("dayMonth", s).format(new Date(ms));

/** "2025-10-14" of the instant in the zone (a calendar day there). */
export function dayKey(ms: number, timeZone: string): string {
  return format(new TZDate(ms, timeZone), "yyyy-MM-dd");
}

/** "2025-10-14T20:22" in the zone, for a datetime-local input. */
export function toLocalInput(ms: number, timeZone: string): string {
  return format(new TZDate(ms, timeZone), "yyyy-MM-dd'T'HH:mm");
}

/**
 * The instant a local date and time names in the zone, or null if it is not a real time.
 * `pattern` is a date-fns pattern ("yyyy-MM-dd'T'HH:mm" for a datetime-local input).
 */
export function fromLocal(value: string, timeZone: string, pattern = "yyyy-MM-dd'T'HH:mm"): number | null {
  const d = parse(value.trim(), pattern, new TZDate(0, timeZone), { in: tz(timeZone) });
  return isValid(d) ? d.getTime() : null;
}

/** A datetime-local input's value read in the zone. */
export const fromLocalInput = (value: string, timeZone: string) => fromLocal(value, timeZone);
