/**
 * The outbox: every change made on the phone is written to the local store and queued here in
 * one transaction, with a client-generated id. The sync runner sends the queue in order and
 * removes an entry only when the server has answered for it (applied or duplicate); a refused
 * entry stays, marked, so the person can see what was not saved and why.
 */
import type { TilldawnDb, LocalReading, OutboxEntry } from "./db.client";
import { unpackReadings } from "./readings-store.client";
import { READING_VALUE_KEYS, type NewReading, type ReadingEdit } from "~/schemas/readings";
import type { ChangeKind, ChangePayload, ChangeResult } from "~/schemas/sync";

export const newId = () => crypto.randomUUID();

type Listener = () => void;
const listeners = new Set<Listener>();
/** Called after every local change (the sync runner debounces a sync on it). */
export function onLocalChange(fn: Listener) {
  listeners.add(fn);
  return () => listeners.delete(fn);
}
function changed() {
  for (const fn of listeners) fn();
}

function entry<K extends ChangeKind>(rigId: string, kind: K, payload: ChangePayload<K>, entityId: string, now = new Date()): OutboxEntry {
  return { id: newId(), rigId, kind, clientTime: now.toISOString(), payload, entityId, state: "waiting", attempts: 0 };
}

export type ReadingInput = Omit<NewReading, "id" | "source"> & { id?: string; source?: NewReading["source"] };

export function toLocalReading(rigId: string, r: NewReading, authorId: string | null, now = Date.now()): LocalReading {
  return {
    id: r.id,
    rigId,
    authorId,
    takenAt: Date.parse(r.takenAt),
    bankVoltageV: r.bankVoltageV ?? null,
    currentA: r.currentA ?? null,
    socPct: r.socPct ?? null,
    temperatureC: r.temperatureC ?? null,
    solarWhToday: r.solarWhToday ?? null,
    note: r.note ?? "",
    source: r.source,
    updatedAt: now,
    sync: "pending",
  };
}

/** Adds readings on the phone (one or a CSV import's many) and queues them, atomically. */
export async function addReadings(db: TilldawnDb, rigId: string, inputs: ReadingInput[], authorId: string | null): Promise<string[]> {
  const now = new Date();
  const readings: NewReading[] = inputs.map((r) => ({ ...r, id: r.id ?? newId(), source: r.source ?? "hand" }));
  await db.transaction("rw", db.readings, db.outbox, async () => {
    await db.readings.bulkPut(readings.map((r) => toLocalReading(rigId, r, authorId, now.getTime())));
    await db.outbox.bulkAdd(readings.map((r) => entry(rigId, "reading.add", { reading: r }, r.id, now)));
  });
  changed();
  return readings.map((r) => r.id);
}

/** An explicit edit: applied locally at once, sent as an edit op (never as an overwrite). */
export async function editReading(db: TilldawnDb, rigId: string, readingId: string, set: ReadingEdit) {
  await db.transaction("rw", db.readings, db.readingDays, db.outbox, async () => {
    // An older reading is taken out of its packed day and becomes a record of its own again.
    const unpacked = await unpackReadings(db, rigId, [readingId]);
    if (unpacked.length) await db.readings.bulkPut(unpacked);
    const local = await db.readings.get(readingId);
    if (local) {
      const next: Partial<LocalReading> = { sync: "pending", updatedAt: Date.now() };
      if (set.takenAt !== undefined) next.takenAt = Date.parse(set.takenAt);
      for (const key of READING_VALUE_KEYS) {
        if (set[key] !== undefined) next[key] = set[key];
      }
      if (set.note !== undefined) next.note = set.note;
      await db.readings.update(readingId, next);
    }
    await db.outbox.add(entry(rigId, "reading.edit", { readingId, set }, readingId));
  });
  changed();
}

export async function deleteReading(db: TilldawnDb, rigId: string, readingId: string) {
  await db.transaction("rw", db.readings, db.readingDays, db.outbox, async () => {
    await db.readings.delete(readingId);
    await unpackReadings(db, rigId, [readingId]);
    await db.outbox.add(entry(rigId, "reading.delete", { readingId }, readingId));
  });
  changed();
}

/** Queues any other change (a Now-screen state write, a model save). */
export async function enqueue<K extends ChangeKind>(db: TilldawnDb, rigId: string, kind: K, payload: ChangePayload<K>, entityId: string = kind) {
  const e = entry(rigId, kind, payload, entityId);
  await db.outbox.add(e);
  changed();
  return e.id;
}

/** The next changes to send for a rig, oldest first. */
export function nextBatch(db: TilldawnDb, rigId: string, max: number) {
  // Equal index keys come back in primary-key order: oldest first.
  return db.outbox.where("[rigId+state]").equals([rigId, "waiting"]).limit(max).toArray();
}

export async function countOutbox(db: TilldawnDb): Promise<{ waiting: number; refused: number }> {
  const [waiting, refused] = await Promise.all([
    db.outbox.where("state").equals("waiting").count(),
    db.outbox.where("state").equals("refused").count(),
  ]);
  return { waiting, refused };
}
/**
 * Records the server's answers: applied and duplicate entries leave the outbox (their readings
 * become "synced" unless another change to them still waits); refused entries stay, marked.
 */
export async function acknowledge(db: TilldawnDb, sent: OutboxEntry[], results: ChangeResult[]) {
  const byId = new Map(results.map((r) => [r.id, r]));
  await db.transaction("rw", db.readings, db.outbox, async () => {
    const done: number[] = [];
    const touched = new Set<string>();
    const refusedReadings = new Map<string, string>();
    for (const e of sent) {
      const result = byId.get(e.id);
      if (!result) continue; // not answered: stays, sent again next time
      if (result.status === "refused") {
        await db.outbox.update(e.seq!, { state: "refused", reason: result.reason, message: result.message });
        if (e.kind === "reading.add" || e.kind === "reading.edit") refusedReadings.set(e.entityId, result.message);
      } else {
        done.push(e.seq!);
        if (e.kind.startsWith("reading.")) touched.add(e.entityId);
      }
    }
    await db.outbox.bulkDelete(done);
    if (!touched.size && !refusedReadings.size) return;
    // In bulk: a batch can acknowledge a thousand readings at once.
    const stillWaiting = new Set(
      (await db.outbox.where("entityId").anyOf([...touched]).filter((x) => x.state === "waiting").toArray()).map((x) => x.entityId),
    );
    const ids = [...new Set([...touched, ...refusedReadings.keys()])];
    const rows = await db.readings.bulkGet(ids);
    const updated = rows.flatMap((r): LocalReading[] => {
      if (!r) return [];
      const refusal = refusedReadings.get(r.id);
      if (refusal !== undefined) return [{ ...r, sync: "refused" as const, refusal }];
      if (r.sync === "pending" && !stillWaiting.has(r.id)) return [{ ...r, sync: "synced" as const }];
      return [];
    });
    await db.readings.bulkPut(updated);
  });
}

/** Forgets a refused change (the person has read why). */
export async function dismissRefused(db: TilldawnDb, seq: number) {
  const e = await db.outbox.get(seq);
  if (!e || e.state !== "refused") return;
  await db.transaction("rw", db.readings, db.outbox, async () => {
    await db.outbox.delete(seq);
    if (e.kind === "reading.add") await db.readings.delete(e.entityId);
  });
  changed();
}
