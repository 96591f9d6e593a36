import { afterAll, describe, expect, test } from "vitest";
import { openTestDb } from "./db";
import { applySync } from "~/repos/sync.server";
import { countReadings, listReadings, readingSeries, walkReadings } from "~/repos/readings.server";
import { addChange, juniperCrew, juniperReading } from "./sync-helpers";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

const HOUR = 3600_000;

async function rigWith(values: Array<{ at: number; v: number; soc: number }>) {
  const { rig, ada } = await juniperCrew(db);
  const changes = values.map(({ at, v, soc }) => addChange(rig.id, { ...juniperReading(0), takenAt: new Date(at).toISOString(), bankVoltageV: v, socPct: soc }));
  for (let i = 0; i < changes.length; i += 1000) {
    await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: null, changes: changes.slice(i, i + 1000) });
  }
  return rig;
}

describe("Logbook readings in PostgreSQL", () => {
  const start = Date.UTC(2025, 9, 1);

  test("a short range comes back point by point, oldest first", async () => {
    const rig = await rigWith([0, 1, 2].map((h) => ({ at: start + h * HOUR, v: 13 + h / 10, soc: 80 - h })));
    const series = await readingSeries(db, rig.id, { from: new Date(start), to: new Date(start + 3 * HOUR) }, 10);
    expect(series.bucketS).toBe(0);
    expect(series.points.map((p) => [p.t, p.bankVoltageV, p.socPct])).toEqual([
      [start, 13, 80],
      [start + HOUR, expect.closeTo(13.1, 5), 79],
      [start + 2 * HOUR, expect.closeTo(13.2, 5), 78],
    ]);
  });

  test("a long range is downsampled into equal time buckets with each bucket's mean, min and max", async () => {
    // Two days of readings every 15 minutes: voltage alternates 13.0 / 13.4, SoC counts up.
    const values = Array.from({ length: 192 }, (_, i) => ({ at: start + i * 15 * 60_000, v: i % 2 ? 13.4 : 13.0, soc: i % 100 }));
    const rig = await rigWith(values);
    // 48 h in at most 12 points: 4-hour buckets of 16 readings each.
    const series = await readingSeries(db, rig.id, { from: new Date(start), to: new Date(start + 48 * HOUR) }, 12);
    expect(series.total).toBe(192);
    expect(series.bucketS).toBe(4 * 3600);
    expect(series.points).toHaveLength(12);
    const first = series.points[0]!;
    expect(first.t).toBe(start);
    expect(first.n).toBe(16);
    expect(first.bankVoltageV).toBeCloseTo(13.2, 5);
    expect(first.vMin).toBeCloseTo(13.0, 5);
    expect(first.vMax).toBeCloseTo(13.4, 5);
    expect(first.socPct).toBeCloseTo(7.5, 5); // mean of 0…15
    expect(series.points[1]!.t).toBe(start + 4 * HOUR);
  });

  test("a year of 5-minute readings draws as at most 600 points", async () => {
    const { rig, ada } = await juniperCrew(db);
    // Insert 105,120 rows straight in SQL (the sync path is tested elsewhere).
    await db.execute(
      (await import("drizzle-orm")).sql`insert into readings (id, rig_id, author_id, taken_at, bank_voltage_v, soc_pct, source)
        select gen_random_uuid(), ${rig.id}::uuid, ${ada.id}::uuid, to_timestamp(${start / 1000} + g * 300), 13.2, 80, 'device'
        from generate_series(0, 105119) g`,
    );
    const t0 = performance.now();
    const series = await readingSeries(db, rig.id, { from: new Date(start), to: new Date(start + 365 * 24 * HOUR) }, 600);
    const ms = performance.now() - t0;
    console.log(`[readings] a year of 5-minute readings downsampled to ${series.points.length} points in ${ms.toFixed(0)} ms`);
    expect(series.total).toBe(105_120);
    expect(series.points.length).toBeLessThanOrEqual(600);
    expect(series.points.reduce((n, p) => n + p.n, 0)).toBe(105_120);
  });

  test("listing pages newest first without repeats, and the export walk visits every reading once", async () => {
    const rig = await rigWith(Array.from({ length: 130 }, (_, i) => ({ at: start + i * 60_000, v: 13, soc: 50 })));
    const seen: string[] = [];
    let before: { takenAt: Date; id: string } | undefined;
    for (;;) {
      const page = await listReadings(db, rig.id, { limit: 50, before });
      if (!page.length) break;
      seen.push(...page.map((r) => r.id));
      const last = page[page.length - 1]!;
      before = { takenAt: last.takenAt, id: last.id };
    }
    expect(seen).toHaveLength(130);
    expect(new Set(seen).size).toBe(130);
    let walked = 0;
    for await (const page of walkReadings(db, rig.id, {}, 40)) walked += page.length;
    expect(walked).toBe(130);
    expect(await countReadings(db, rig.id)).toBe(130);
  });
});
