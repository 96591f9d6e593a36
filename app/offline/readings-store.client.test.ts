import "fake-indexeddb/auto";
import { afterEach, beforeEach, describe, expect, test } from "vitest";
import { TilldawnDb, type LocalReading } from "./db.client";
import { deleteReading, editReading } from "./outbox.client";
import { compactReadings, findReading, packDay, prunePackedDays, readingsInRange, unpackDay } from "./readings-store.client";

const RIG = "3f1d2c4b-5a69-4e7f-8a1b-2c3d4e5f6a7b";
const DAY = 86_400_000;
const now = Date.UTC(2025, 9, 20, 12);

const row = (i: number, extra: Partial<LocalReading> = {}): LocalReading => ({
  id: `00000000-0000-4000-8000-${String(i).padStart(12, "0")}`,
  rigId: RIG,
  authorId: i % 2 ? "ada" : "sam",
  takenAt: now - 10 * DAY + i * 300_000,
  bankVoltageV: 13.25,
  currentA: i % 3 ? -4.5 : null,
  socPct: 80,
  temperatureC: 14,
  solarWhToday: null,
  note: i === 3 ? "fridge cycled" : "",
  source: i % 2 ? "hand" : "csv",
  updatedAt: now - DAY,
  sync: "synced",
  ...extra,
});

let db: TilldawnDb;
beforeEach(() => {
  db = new TilldawnDb(`store-${crypto.randomUUID()}`);
});
afterEach(async () => {
  await db.delete();
});

describe("Packed days of readings", () => {
  test("packing and unpacking a day gives the readings back, nulls and notes included (values as 32-bit floats)", () => {
    const rows = [row(2), row(0), row(1), row(3)];
    const back = unpackDay(packDay(RIG, 0, rows));
    expect(back.map((r) => r.id)).toEqual([row(0), row(1), row(2), row(3)].map((r) => r.id));
    expect(back[3]).toMatchObject({ note: "fridge cycled", authorId: "ada", source: "hand", currentA: null, solarWhToday: null, sync: "synced" });
    expect(back[1]).toMatchObject({ currentA: -4.5, bankVoltageV: 13.25, authorId: "ada", source: "hand", note: "" });
    expect(unpackDay(packDay(RIG, 0, [row(0, { bankVoltageV: 13.27 })]))[0]!.bankVoltageV).toBe(13.27);
  });

  test("compaction packs synced readings older than two days and leaves recent and waiting ones as they are; reads merge both", async () => {
    const old = Array.from({ length: 600 }, (_, i) => row(i));
    const waiting = row(900, { sync: "pending", takenAt: now - 9 * DAY });
    const recent = row(901, { takenAt: now - 3600_000 });
    await db.readings.bulkPut([...old, waiting, recent]);
    await compactReadings(db, RIG, now);
    expect(await db.readings.count()).toBe(2);
    expect(await db.readingDays.count()).toBeGreaterThanOrEqual(2);
    const all = await readingsInRange(db, RIG);
    expect(all).toHaveLength(602);
    expect(all[0]!.id).toBe(recent.id);
    expect(new Set(all.map((r) => r.id)).size).toBe(602);
    const inRange = await readingsInRange(db, RIG, old[10]!.takenAt, old[19]!.takenAt);
    expect(inRange.map((r) => r.id)).toEqual(old.slice(10, 20).reverse().map((r) => r.id));
  });

  test("editing or deleting an older reading takes it out of its packed day first", async () => {
    await db.readings.bulkPut(Array.from({ length: 5 }, (_, i) => row(i)));
    await compactReadings(db, RIG, now);
    expect(await db.readings.count()).toBe(0);
    await editReading(db, RIG, row(1).id, { note: "checked with a meter" });
    expect(await db.readings.get(row(1).id)).toMatchObject({ note: "checked with a meter", sync: "pending" });
    expect(await findReading(db, row(1).id)).toMatchObject({ note: "checked with a meter" });
    await deleteReading(db, RIG, row(2).id);
    expect(await findReading(db, row(2).id)).toBeUndefined();
    expect((await readingsInRange(db, RIG)).map((r) => r.id).sort()).toEqual([0, 1, 3, 4].map((i) => row(i).id).sort());
  });

  test("packed days older than the window are pruned", async () => {
    await db.readings.bulkPut([row(0), row(1, { takenAt: now - 200 * DAY })]);
    await compactReadings(db, RIG, now);
    await prunePackedDays(db, RIG, now - 90 * DAY);
    expect((await readingsInRange(db, RIG)).map((r) => r.id)).toEqual([row(0).id]);
  });
});
