/**
 * Logbook readings: listing, server-side downsampling for long chart ranges, and the CSV
 * export's keyset-paged walk (memory stays flat however many readings a rig has).
 * Writes go through the sync repository (app/repos/sync.server.ts) so that every write lands
 * in the change log.
 */
import { and, asc, desc, eq, gt, gte, isNull, lt, lte, or, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { readings } from "~/db/schema";
import type { WireReading } from "~/schemas/readings";

export type ReadingRow = typeof readings.$inferSelect;

export function toWire(row: ReadingRow): WireReading {
  return {
    id: row.id,
    rigId: row.rigId,
    authorId: row.authorId,
    takenAt: row.takenAt.toISOString(),
    bankVoltageV: row.bankVoltageV,
    currentA: row.currentA,
    socPct: row.socPct,
    temperatureC: row.temperatureC,
    solarWhToday: row.solarWhToday,
    note: row.note,
    source: row.source,
    updatedAt: row.updatedAt.toISOString(),
    deletedAt: row.deletedAt ? row.deletedAt.toISOString() : null,
  };
}

export type Range = { from?: Date; to?: Date };

function rangeWhere(rigId: string, range: Range) {
  return and(
    eq(readings.rigId, rigId),
    isNull(readings.deletedAt),
    range.from ? gte(readings.takenAt, range.from) : undefined,
    range.to ? lte(readings.takenAt, range.to) : undefined,
  );
}

/** Newest first, keyset-paged by (takenAt, id) so deep pages stay cheap. */
export async function listReadings(
  db: Db,
  rigId: string,
  opts: Range & { limit?: number; before?: { takenAt: Date; id: string } } = {},
) {
  const limit = Math.min(Math.max(opts.limit ?? 50, 1), 500);
  const before = opts.before;
  const rows = await db
    .select()
    .from(readings)
    .where(
      and(
        rangeWhere(rigId, opts),
        before
          ? or(lt(readings.takenAt, before.takenAt), and(eq(readings.takenAt, before.takenAt), lt(readings.id, before.id)))
          : undefined,
      ),
    )
    .orderBy(desc(readings.takenAt), desc(readings.id))
    .limit(limit);
  return rows;
}

export async function countReadings(db: Db, rigId: string, range: Range = {}) {
  const [row] = await db.select({ n: sql<number>`count(*)::int` }).from(readings).where(rangeWhere(rigId, range));
  return row?.n ?? 0;
}

export async function getReading(db: Db, id: string) {
  const [row] = await db.select().from(readings).where(eq(readings.id, id));
  return row ?? null;
}

/** One point of a chart series: the bucket's start and the mean of each value in it. */
export type SeriesPoint = {
  t: number;
  bankVoltageV: number | null;
  vMin: number | null;
  vMax: number | null;
  socPct: number | null;
  n: number;
};

/**
 * Readings in a range for a chart of at most `maxPoints` points. When the range holds more,
 * PostgreSQL groups them into equal time buckets (width = span / maxPoints, rounded up to a
 * whole second) and answers each bucket's mean voltage and SoC and the voltage's min and max,
 * so a year of 5-minute readings (105,120 rows) comes back as a few hundred points.
 */
export async function readingSeries(db: Db, rigId: string, range: { from: Date; to: Date }, maxPoints = 600) {
  const total = await countReadings(db, rigId, range);
  const spanS = Math.max(1, (range.to.getTime() - range.from.getTime()) / 1000);
  if (total <= maxPoints) {
    const rows = await db
      .select({ takenAt: readings.takenAt, v: readings.bankVoltageV, soc: readings.socPct })
      .from(readings)
      .where(rangeWhere(rigId, range))
      .orderBy(asc(readings.takenAt));
    return {
      bucketS: 0,
      total,
      points: rows.map<SeriesPoint>((r) => ({
        t: r.takenAt.getTime(),
        bankVoltageV: r.v,
        vMin: r.v,
        vMax: r.v,
        socPct: r.soc,
        n: 1,
      })),
    };
  }
  const bucketS = Math.ceil(spanS / maxPoints);
  const fromS = Math.floor(range.from.getTime() / 1000);
  // Whole numbers computed here, inlined so the SELECT and GROUP BY expressions are identical.
  const bucket = sql`floor((extract(epoch from ${readings.takenAt}) - ${sql.raw(String(fromS))}) / ${sql.raw(String(bucketS))})::int`;
  const rows = await db
    .select({
      b: bucket.mapWith(Number),
      v: sql<number | null>`avg(${readings.bankVoltageV})::float8`,
      vMin: sql<number | null>`min(${readings.bankVoltageV})::float8`,
      vMax: sql<number | null>`max(${readings.bankVoltageV})::float8`,
      soc: sql<number | null>`avg(${readings.socPct})::float8`,
      n: sql<number>`count(*)::int`,
    })
    .from(readings)
    .where(rangeWhere(rigId, range))
    .groupBy(bucket)
    .orderBy(bucket);
  return {
    bucketS,
    total,
    points: rows.map<SeriesPoint>((r) => ({
      t: (fromS + r.b * bucketS) * 1000,
      bankVoltageV: r.v,
      vMin: r.vMin,
      vMax: r.vMax,
      socPct: r.soc,
      n: r.n,
    })),
  };
}

/**
 * Walks a rig's readings oldest first in pages of `pageSize` (keyset on takenAt, id): the CSV
 * export streams these, so the server never holds a whole year in memory.
 */
export async function* walkReadings(db: Db, rigId: string, range: Range = {}, pageSize = 5000) {
  let after: { takenAt: Date; id: string } | null = null;
  for (;;) {
    const page: ReadingRow[] = await db
      .select()
      .from(readings)
      .where(
        and(
          rangeWhere(rigId, range),
          after
            ? or(gt(readings.takenAt, after.takenAt), and(eq(readings.takenAt, after.takenAt), gt(readings.id, after.id)))
            : undefined,
        ),
      )
      .orderBy(asc(readings.takenAt), asc(readings.id))
      .limit(pageSize);
    if (page.length === 0) return;
    yield page;
    const last = page[page.length - 1]!;
    after = { takenAt: last.takenAt, id: last.id };
    if (page.length < pageSize) return;
  }
}
