/**
 * The phone's local store: one typed Dexie database with versioned stores. Everything the app
 * needs to open, compute and take readings with no network lives here; the outbox holds every
 * change made on the phone until the server has acknowledged it.
 *
 * Versions: add a new `this.version(n).stores({...})` with an upgrade when a store changes;
 * never edit an old version's schema.
 */
import Dexie, { type EntityTable, type Table } from "dexie";
import type { Role } from "~/auth/roles";
import type { RigModel } from "~/engine/model";
import type { RigState } from "~/schemas/rig-state";
import type { ChangeKind } from "./protocol";

export type { Role };

/** A rig this person can see, and their role on it (as last told by the server). */
export type LocalRig = { id: string; name: string; role: Role | null; userId: string | null; seenAt: number };

/** An as-built revision of a rig's model the person has seen. */
export type LocalModel = { rigId: string; revision: number; name: string; model: RigModel; savedAt: number };

/** The shared state of a rig (switches, mode, SoC…), with local changes applied on top. */
export type LocalState = { rigId: string; state: RigState; fetchedAt: number; extra?: Record<string, unknown> };

/** The rig's modes, kept apart so a mode list shows before the whole model is read. */
export type LocalMode = { rigId: string; id: string; name: string; order: number };

export type ReadingSyncState = "pending" | "synced" | "refused";

/** A logbook reading. Times are epoch milliseconds (compact, and sortable in an index). */
export type LocalReading = {
  id: string;
  rigId: string;
  authorId: string | null;
  takenAt: number;
  bankVoltageV: number | null;
  currentA: number | null;
  socPct: number | null;
  temperatureC: number | null;
  solarWhToday: number | null;
  note: string;
  source: "hand" | "csv" | "device";
  updatedAt: number;
  sync: ReadingSyncState;
  /** Why the server refused it, when it did. */
  refusal?: string;
};

/** One change made on the phone, waiting for the server (or refused by it, kept to show). */
export type OutboxEntry = {
  seq?: number;
  /** Client-generated id: the server applies a change id once however often it is sent. */
  id: string;
  rigId: string;
  kind: ChangeKind;
  clientTime: string;
  payload: unknown;
  /** The reading (or other thing) the change is about, to find pending edits quickly. */
  entityId: string;
  state: "waiting" | "refused";
  attempts: number;
  reason?: string;
  message?: string;
};

/** Synced readings of one rig and UTC day, packed column by column (see readings-store.client.ts). */
export type LocalReadingDay = {
  rigId: string;
  day: number;
  ids: string[];
  t: Float64Array;
  v: Float32Array;
  a: Float32Array;
  soc: Float32Array;
  temp: Float32Array;
  wh: Float32Array;
  notes: string[];
  /** One letter per reading: h (by hand), c (CSV), d (device). */
  src: string;
  authors: string[];
  author: Uint16Array;
  upd: Float64Array;
};

export type MetaEntry = { key: string; value: unknown };

export class TilldawnDb extends Dexie {
  rigs!: EntityTable<LocalRig, "id">;
  models!: Table<LocalModel, [string, number]>;
  states!: EntityTable<LocalState, "rigId">;
  modes!: Table<LocalMode, [string, string]>;
  readings!: EntityTable<LocalReading, "id">;
  readingDays!: Table<LocalReadingDay, [string, number]>;
  outbox!: EntityTable<OutboxEntry, "seq">;
  meta!: EntityTable<MetaEntry, "key">;

  constructor(name = "tilldawn") {
    super(name);
    this.version(1).stores({
      rigs: "id",
      models: "[rigId+revision], rigId",
      states: "rigId",
      modes: "[rigId+id], rigId",
      readings: "id, [rigId+takenAt]",
      outbox: "++seq, &id, [rigId+state], entityId, state",
      meta: "key",
    });
    // 2: older synced readings packed per day (a year of 5-minute readings stays small).
    this.version(2).stores({ readingDays: "[rigId+day], rigId" });
  }
}

let shared: TilldawnDb | undefined;

/** The app's one database (created on first use, in the browser only). */
export function localDb(): TilldawnDb {
  shared ??= new TilldawnDb();
  return shared;
}

export async function getMeta<T>(db: TilldawnDb, key: string, fallback: T): Promise<T> {
  const row = await db.meta.get(key);
  return row === undefined ? fallback : (row.value as T);
}

export function setMeta(db: TilldawnDb, key: string, value: unknown) {
  return db.meta.put({ key, value });
}

/** How many days of readings the phone keeps (older synced readings are pruned). */
export const DEFAULT_WINDOW_DAYS = 90;
export const windowDays = (db: TilldawnDb) => getMeta(db, "windowDays", DEFAULT_WINDOW_DAYS);
