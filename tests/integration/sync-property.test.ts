/**
 * Sync, as a property (issue 9): three phones' changes delivered shuffled (each phone's own
 * outbox stays in its order, as the runner sends it), in random batches, with re-sent
 * batches and changes, and with corrupted changes mixed in (junk kinds, NUL in notes, values
 * the column cannot hold, year-0000 times, malformed envelopes, and bad copies that arrive
 * before the real change with the same id) store exactly what the clean set stores when
 * applied once, in order.
 */
import { afterAll, describe, expect, test } from "vitest";
import fc from "fast-check";
import { asc, eq } from "drizzle-orm";
import { readings, syncChanges } from "~/db/schema";
import { applySync, type SyncActor } from "~/repos/sync.server";
import type { Change } from "~/schemas/sync";
import { openTestDb } from "./db";
import { juniperCrew, juniperReading } from "./sync-helpers";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

type Op = { type: "add" } | { type: "edit"; of: number; note: string; socPct: number } | { type: "delete"; of: number };

const opArb: fc.Arbitrary<Op> = fc.oneof(
  { arbitrary: fc.constant<Op>({ type: "add" }), weight: 4 },
  { arbitrary: fc.record({ type: fc.constant("edit" as const), of: fc.nat(20), note: fc.string({ maxLength: 12 }), socPct: fc.integer({ min: 0, max: 100 }) }), weight: 2 },
  { arbitrary: fc.record({ type: fc.constant("delete" as const), of: fc.nat(20) }), weight: 1 },
);
const phoneArb = fc.array(opArb, { minLength: 1, maxLength: 10 });

/** How one phone's outbox is delivered: batch sizes, re-sends and corruptions, all as choices. */
const deliveryArb = fc.record({
  batchSizes: fc.array(fc.integer({ min: 1, max: 4 }), { minLength: 12, maxLength: 12 }),
  resendBatch: fc.array(fc.boolean(), { minLength: 12, maxLength: 12 }),
  junk: fc.array(fc.nat(6), { minLength: 12, maxLength: 12 }),
  badCopyFirst: fc.array(fc.boolean(), { minLength: 12, maxLength: 12 }),
});

type DeliveryPlan = { batchSizes: number[]; resendBatch: boolean[]; junk: number[]; badCopyFirst: boolean[] };

/** The phones' changes for one rig; `ids` maps each scenario slot to this rig's uuids. */
function buildChanges(rigId: string, phones: Op[][], ids: (slot: string) => string): Change[][] {
  return phones.map((ops, p) => {
    const adds: number[] = [];
    const out: Change[] = [];
    ops.forEach((op, i) => {
      const clientTime = new Date(Date.UTC(2025, 9, 12, 1, p * 20 + i)).toISOString();
      const id = ids(`change:${p}:${i}`);
      if (op.type === "add") {
        adds.push(i);
        const reading = { ...juniperReading(p * 20 + i), id: ids(`reading:${p}:${i}`) };
        out.push({ id, kind: "reading.add", rigId, clientTime, payload: { reading } });
      } else if (adds.length) {
        // Each phone edits and deletes only its own readings (its outbox keeps their order).
        const target = ids(`reading:${p}:${adds[op.of % adds.length]!}`);
        out.push(
          op.type === "edit"
            ? { id, kind: "reading.edit", rigId, clientTime, payload: { readingId: target, set: { note: op.note, socPct: op.socPct } } }
            : { id, kind: "reading.delete", rigId, clientTime, payload: { readingId: target } },
        );
      }
    });
    return out;
  });
}

function junkChange(rigId: string, n: number, like?: Change): unknown {
  const base = like ?? { id: crypto.randomUUID(), kind: "reading.add", rigId, clientTime: new Date().toISOString(), payload: { reading: juniperReading(0) } };
  const reading = { ...juniperReading(7), id: crypto.randomUUID() };
  switch (n % 7) {
    case 0:
      return { ...base, kind: ["constructor", "__proto__", "toString"][n % 3] };
    case 1:
      return { ...base, kind: "reading.add", payload: { reading: { ...reading, note: "a\u0000b" } } };
    case 2:
      return { ...base, kind: "reading.add", payload: { reading: { ...reading, bankVoltageV: 1e-46 } } };
    case 3:
      return { ...base, clientTime: "0000-01-01T00:00:00Z" };
    case 4:
      return { ...base, id: "not-a-uuid" };
    case 5:
      return { ...base, kind: "reading.edit", payload: { readingId: "nope", set: { socPct: 400 } } };
    default:
      return 42;
  }
}

/** One phone's outbox as batches: split, bad copies before real ones, junk mixed in, re-sends. */
function deliver(rigId: string, changes: Change[], plan: DeliveryPlan): unknown[][] {
  const batches: unknown[][] = [];
  let at = 0;
  for (let b = 0; at < changes.length; b++) {
    const k = b % 12;
    const size = plan.batchSizes[k]!;
    const real = changes.slice(at, at + size);
    at += size;
    const batch: unknown[] = [];
    for (const c of real) {
      // A corrupted copy with the real change's id, sent first: refused, so the real one still applies.
      if (plan.badCopyFirst[k]) batch.push(junkChange(rigId, plan.junk[k]! === 4 ? 0 : plan.junk[k]!, c));
      batch.push(c);
    }
    for (let j = 0; j < plan.junk[k]! % 3; j++) batch.push(junkChange(rigId, plan.junk[k]! + j));
    batches.push(batch);
    if (plan.resendBatch[k]) batches.push([...real]); // the answer was lost: the phone sends again
  }
  return batches;
}

async function storedOf(rigId: string, back: (id: string) => string) {
  const rows = await db.select().from(readings).where(eq(readings.rigId, rigId)).orderBy(asc(readings.takenAt));
  const log = await db.select({ kind: syncChanges.kind, entityId: syncChanges.entityId }).from(syncChanges).where(eq(syncChanges.rigId, rigId));
  return {
    readings: rows
      .map((r) => ({ id: back(r.id), author: r.authorId, takenAt: r.takenAt.toISOString(), v: r.bankVoltageV, soc: r.socPct, note: r.note, deleted: r.deletedAt !== null }))
      .sort((a, b) => a.id.localeCompare(b.id)),
    log: log.map((l) => `${l.kind}:${back(l.entityId)}`).sort(),
  };
}

describe("Sync as a property", () => {
  test("shuffled, duplicated and partly corrupted deliveries from three phones store what the clean set stores", async () => {
    await fc.assert(
      fc.asyncProperty(fc.tuple(phoneArb, phoneArb, phoneArb), fc.tuple(deliveryArb, deliveryArb, deliveryArb), fc.array(fc.nat(2), { minLength: 60, maxLength: 60 }), async (phones, plans, order) => {
        const clean = await juniperCrew(db);
        const messy = await juniperCrew(db);
        // Phones 0 and 1 are Ada's phone and tablet (owner), phone 2 is Sam's (crew).
        const actorsOf = (c: Awaited<ReturnType<typeof juniperCrew>>): SyncActor[] => [
          { userId: c.ada.id, role: "owner" },
          { userId: c.ada.id, role: "owner" },
          { userId: c.sam.id, role: "crew" },
        ];
        const cleanIds = new Map<string, string>();
        const messyIds = new Map<string, string>();
        const backToSlot = new Map<string, string>();
        const idFor = (map: Map<string, string>) => (slot: string) => {
          let id = map.get(slot);
          if (!id) {
            id = crypto.randomUUID();
            map.set(slot, id);
            backToSlot.set(id, slot);
          }
          return id;
        };
        const cleanChanges = buildChanges(clean.rig.id, phones, idFor(cleanIds));
        const messyChanges = buildChanges(messy.rig.id, phones, idFor(messyIds));

        // Clean: each phone's changes once, in order.
        for (let p = 0; p < 3; p++) {
          if (cleanChanges[p]!.length) await applySync(db, actorsOf(clean)[p]!, { rigId: clean.rig.id, cursor: null, changes: cleanChanges[p]! });
        }

        // Messy: each phone's batches in its own order, phones interleaved as `order` picks.
        const queues = messyChanges.map((changes, p) => deliver(messy.rig.id, changes, plans[p]!));
        let pick = 0;
        while (queues.some((q) => q.length)) {
          let p = order[pick++ % order.length]!;
          while (!queues[p]!.length) p = (p + 1) % 3;
          const batch = queues[p]!.shift()!;
          const answer = await applySync(db, actorsOf(messy)[p]!, { rigId: messy.rig.id, cursor: null, changes: batch });
          expect(answer.results).toHaveLength(batch.length);
        }

        const slotOf = (id: string) => backToSlot.get(id) ?? id;
        const cleanStored = await storedOf(clean.rig.id, slotOf);
        const messyStored = await storedOf(messy.rig.id, slotOf);
        // Authors differ per fixture (two sets of people): compare who by role instead.
        const who = (c: Awaited<ReturnType<typeof juniperCrew>>) => (id: string | null) => (id === c.ada.id ? "ada" : id === c.sam.id ? "sam" : String(id));
        const norm = (s: typeof cleanStored, c: Awaited<ReturnType<typeof juniperCrew>>) => ({
          readings: s.readings.map((r) => ({ ...r, author: who(c)(r.author) })),
          log: s.log,
        });
        expect(norm(messyStored, messy)).toEqual(norm(cleanStored, clean));
      }),
      { numRuns: 12, endOnFailure: true },
    );
  }, 120_000);
});
