/**
 * Readings on the phone, in two tiers so a year of 5-minute readings stays small:
 * - `readings`: one record per reading for the last HOT_MS and for anything not yet synced;
 * - `readingDays`: synced readings of older days packed into one columnar record per rig and
 *   UTC day (typed arrays for the numbers), about a tenth of the size.
 * Readers go through `readingsInRange` / `findReading`, which merge both tiers (a record in
 * `readings` wins over a packed copy of the same id).
 */
import type { LocalReading, LocalReadingDay, TilldawnDb } from "./db.client";

export const HOT_MS = 2 * 86_400_000;
const DAY_MS = 86_400_000;
const dayOf = (ms: number) => Math.floor(ms / DAY_MS);
const SOURCES = { hand: "h", csv: "c", device: "d" } as const;
const SOURCE_OF = { h: "hand", c: "csv", d: "device" } as const;

// Stored as 32-bit floats: rounded back to 4 decimals (more than any reading carries).
const num = (x: number) => (Number.isNaN(x) ? null : Math.round(x * 10_000) / 10_000);

export function unpackDay(d: LocalReadingDay): LocalReading[] {
  return d.ids.map((id, i) => ({
    id,
    rigId: d.rigId,
    authorId: d.authors[d.author[i]!] ?? null,
    takenAt: d.t[i]!,
    bankVoltageV: num(d.v[i]!),
    currentA: num(d.a[i]!),
    socPct: num(d.soc[i]!),
    temperatureC: num(d.temp[i]!),
    solarWhToday: num(d.wh[i]!),
    note: d.notes[i] ?? "",
    source: SOURCE_OF[(d.src[i] ?? "h") as keyof typeof SOURCE_OF],
    updatedAt: d.upd[i]!,
    sync: "synced",
  }));
}

export function packDay(rigId: string, day: number, rows: LocalReading[]): LocalReadingDay {
  const sorted = [...rows].sort((a, b) => a.takenAt - b.takenAt);
  const authors: string[] = [];
  const author = new Uint16Array(sorted.length);
  const f32 = (pick: (r: LocalReading) => number | null) => Float32Array.from(sorted, (r) => pick(r) ?? NaN);
  sorted.forEach((r, i) => {
    const a = r.authorId ?? "";
    let k = authors.indexOf(a);
    if (k < 0) k = authors.push(a) - 1;
    author[i] = k;
  });
  return {
    rigId,
    day,
    ids: sorted.map((r) => r.id),
    t: Float64Array.from(sorted, (r) => r.takenAt),
    v: f32((r) => r.bankVoltageV),
    a: f32((r) => r.currentA),
    soc: f32((r) => r.socPct),
    temp: f32((r) => r.temperatureC),
    wh: f32((r) => r.solarWhToday),
    notes: sorted.map((r) => r.note),
    src: sorted.map((r) => SOURCES[r.source]).join(""),
    authors: authors.map((a) => a),
    author,
    upd: Float64Array.from(sorted, (r) => r.updatedAt),
  };
}

/** Moves synced readings older than HOT_MS into their day's packed record. */
export async function compactReadings(db: TilldawnDb, rigId: string, now = Date.now()) {
  const cutoff = now - HOT_MS;
  await db.transaction("rw", db.readings, db.readingDays, async () => {
    const old = await db.readings
      .where("[rigId+takenAt]")
      .between([rigId, -Infinity], [rigId, cutoff], true, false)
      .filter((r) => r.sync === "synced")
      .toArray();
    if (!old.length) return;
    const byDay = new Map<number, LocalReading[]>();
    for (const r of old) {
      const d = dayOf(r.takenAt);
      let list = byDay.get(d);
      if (!list) byDay.set(d, (list = []));
      list.push(r);
    }
    const days = [...byDay.keys()];
    const existing = await db.readingDays.bulkGet(days.map((d) => [rigId, d] as [string, number]));
    const packed = days.map((d, i) => {
      const incoming = byDay.get(d)!;
      const ids = new Set(incoming.map((r) => r.id));
      const kept = existing[i] ? unpackDay(existing[i]!).filter((r) => !ids.has(r.id)) : [];
      return packDay(rigId, d, [...kept, ...incoming]);
    });
    await db.readingDays.bulkPut(packed);
    await db.readings.bulkDelete(old.map((r) => r.id));
  });
}

/** Readings of a rig taken in [from, to], newest first, from both tiers. */
export async function readingsInRange(db: TilldawnDb, rigId: string, from = -Infinity, to = Infinity): Promise<LocalReading[]> {
  const hot = await db.readings.where("[rigId+takenAt]").between([rigId, from], [rigId, to], true, true).toArray();
  const seen = new Set(hot.map((r) => r.id));
  const days = await db.readingDays
    .where("[rigId+day]")
    .between([rigId, Number.isFinite(from) ? dayOf(from) : -Infinity], [rigId, Number.isFinite(to) ? dayOf(to) : Infinity], true, true)
    .toArray();
  const packed = days.flatMap(unpackDay).filter((r) => !seen.has(r.id) && r.takenAt >= from && r.takenAt <= to);
  return [...hot, ...packed].sort((a, b) => b.takenAt - a.takenAt);
}

/** One reading by id from either tier. */
export async function findReading(db: TilldawnDb, id: string): Promise<LocalReading | undefined> {
  const hot = await db.readings.get(id);
  if (hot) return hot;
  let found: LocalReading | undefined;
  await db.readingDays.each((d) => {
    if (found) return;
    const i = d.ids.indexOf(id);
    if (i >= 0) found = unpackDay(d)[i];
  });
  return found;
}

/** Takes readings out of their packed days (before an edit or a delete, or a pulled delete). */
export async function unpackReadings(db: TilldawnDb, rigId: string, ids: string[]): Promise<LocalReading[]> {
  if (!ids.length) return [];
  const wanted = new Set(ids);
  const out: LocalReading[] = [];
  const changed: LocalReadingDay[] = [];
  await db.readingDays
    .where("rigId")
    .equals(rigId)
    .each((d) => {
      if (!d.ids.some((id) => wanted.has(id))) return;
      const rows = unpackDay(d);
      out.push(...rows.filter((r) => wanted.has(r.id)));
      changed.push(packDay(rigId, d.day, rows.filter((r) => !wanted.has(r.id))));
    });
  for (const d of changed) {
    if (d.ids.length) await db.readingDays.put(d);
    else await db.readingDays.delete([rigId, d.day]);
  }
  return out;
}

/** Drops packed days older than the window. */
export async function prunePackedDays(db: TilldawnDb, rigId: string, olderThan: number) {
  await db.readingDays.where("[rigId+day]").between([rigId, -Infinity], [rigId, dayOf(olderThan)], true, false).delete();
}
