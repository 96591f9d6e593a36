/**
 * Time helpers of the engine. The engine never reads the clock: every instant comes in as an
 * argument (ISO text or epoch ms) from the caller.
 */
import { utcOffsetMinutes } from "./solar";

export const MS_PER_H = 3_600_000;
export const MS_PER_DAY = 86_400_000;

/** The local calendar date (YYYY-MM-DD) of an instant in an IANA time zone. */
export function localDate(ms: number, timeZone: string): string {
  const off = utcOffsetMinutes(ms, timeZone);
  return new Date(ms + off * 60_000).toISOString().slice(0, 10);
}

/** Local decimal hour (0–24) of an instant in an IANA time zone. */
export function localHour(ms: number, timeZone: string): number {
  const off = utcOffsetMinutes(ms, timeZone);
  const h = ((ms + off * 60_000) / MS_PER_H) % 24;
  return h < 0 ? h + 24 : h;
}

/** Hours from one instant to another. */
export function hoursBetween(fromMs: number, toMs: number): number {
  return (toMs - fromMs) / MS_PER_H;
}
