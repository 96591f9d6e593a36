/**
 * Feeds logbook readings to the engine's capacity estimate (app/engine/capacity.ts) month by
 * month, giving a health trend. Which readings count as a resting voltage is decided here:
 * the current stayed within ±REST_A for at least REST_MIN minutes before it (the bank was at
 * rest), and at most one such point per day is offered (the engine pairs trusted points, so
 * fewer, better points keep it fast).
 */
import { estimateCapacity, type CapacityEstimate, type LogReading } from "~/engine/capacity";
import type { Bank } from "~/engine/model";
import type { LocalReading } from "~/offline/db.client";
import { dayKey } from "~/lib/datetime";

export const REST_A = 0.5;
export const REST_MIN = 60;

type Point = Pick<LocalReading, "takenAt" | "currentA" | "bankVoltageV" | "socPct">;

export function toLogReadings(readings: Point[], timeZone = "UTC"): LogReading[] {
  const rs = [...readings].sort((a, b) => a.takenAt - b.takenAt);
  const out: LogReading[] = [];
  let restSince: number | null = null;
  let lastRestDay = "";
  for (const r of rs) {
    const atRest = r.currentA !== null && Math.abs(r.currentA) <= REST_A;
    if (!atRest) restSince = null;
    else restSince ??= r.takenAt;
    const entry: LogReading = { atMs: r.takenAt };
    if (r.currentA !== null) entry.currentA = r.currentA;
    const day = dayKey(r.takenAt, timeZone);
    if (atRest && restSince !== null && r.bankVoltageV !== null && r.takenAt - restSince >= REST_MIN * 60_000 && day !== lastRestDay) {
      entry.restingV = r.bankVoltageV;
      lastRestDay = day;
    }
    out.push(entry);
  }
  return out;
}

export type HealthPoint = { month: string; estimate: CapacityEstimate };

/** One capacity estimate per calendar month (in the rig's time zone) that has readings, oldest first. */
export function healthTrend(bank: Bank, readings: Point[], timeZone = "UTC"): HealthPoint[] {
  const byMonth = new Map<string, Point[]>();
  for (const r of readings) {
    const month = dayKey(r.takenAt, timeZone).slice(0, 7);
    let list = byMonth.get(month);
    if (!list) byMonth.set(month, (list = []));
    list.push(r);
  }
  return [...byMonth.entries()]
    .sort(([a], [b]) => a.localeCompare(b))
    .map(([month, list]) => ({ month, estimate: estimateCapacity(bank, toLogReadings(list, timeZone)) }));
}
