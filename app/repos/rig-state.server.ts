/**
 * The shared rig state (Now screen): read it, and write one change at a time.
 *
 * Concurrency: every field ("load:<id>", "switch:<id>", "mode", "soc", "place", "weather")
 * remembers the server time and author of its last change. A write is stamped with the server
 * time it was received; under a row lock it changes a field only if no write received LATER has
 * already changed it. So the last writer by server time wins, whatever order the transactions
 * commit in, and the loser's answer lists the fields it lost (`superseded: true`). Writes to
 * different fields never conflict. See DEVELOPERS.md, "Shared state and conflicts".
 */
import { and, desc, eq, inArray, isNull, or, isNotNull } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { readings, rigState, switchChanges, users } from "~/db/schema";
import type { RigModel } from "~/engine/model";
import {
  effectiveLoadsOn,
  emptyRigState,
  placeSchema,
  weatherSchema,
  type LatestReading,
  type RigState,
  type StateChange,
  type StateWrite,
  type StateWriteResult,
  type Superseded,
} from "~/schemas/rig-state";

type Row = typeof rigState.$inferSelect;
type FieldTime = { at: string; by: string | null; v: number };

export function rowToState(row: Row, names: Map<string, string>): RigState {
  const base = emptyRigState(row.rigId);
  const place = placeSchema.safeParse(row.place);
  const weather = weatherSchema.safeParse(row.weather);
  const fieldTimes: RigState["fieldTimes"] = {};
  for (const [field, t] of Object.entries(row.fieldTimes as Record<string, FieldTime>)) {
    const byName = t.by ? names.get(t.by) : undefined;
    fieldTimes[field] = { at: t.at, by: t.by, ...(byName ? { byName } : {}) };
  }
  return {
    ...base,
    version: row.version,
    modeId: row.modeId,
    switches: row.switches,
    positions: row.positions,
    soc:
      row.socPct !== null && row.socSource !== null && row.socTakenAt !== null
        ? {
            socPct: row.socPct,
            source: row.socSource,
            ...(row.socRestingV !== null ? { restingV: row.socRestingV } : {}),
            takenAt: row.socTakenAt.toISOString(),
          }
        : null,
    ...(row.bankSocs && Object.keys(row.bankSocs).length ? { bankSocs: row.bankSocs } : {}),
    place: place.success ? place.data : base.place,
    weather: weather.success ? weather.data : base.weather,
    fieldTimes,
    updatedAt: row.version > 0 ? row.updatedAt.toISOString() : null,
  };
}

async function authorNames(db: Db, row: Row, more: Array<string | null> = []): Promise<Map<string, string>> {
  const ids = [...new Set([...Object.values(row.fieldTimes as Record<string, FieldTime>).map((t) => t.by), ...more].flatMap((by) => (by ? [by] : [])))];
  if (!ids.length) return new Map();
  const found = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(inArray(users.id, ids));
  return new Map(found.map((u) => [u.id, u.name || u.email.split("@")[0]!]));
}

/** The rig's shared state; a rig nobody has touched yet answers the empty state (version 0). */
export async function getRigState(db: Db, rigId: string): Promise<RigState> {
  const [row] = await db.select().from(rigState).where(eq(rigState.rigId, rigId));
  if (!row) return emptyRigState(rigId);
  return rowToState(row, await authorNames(db, row));
}

/** The fields a change touches, given the state before it. */
function fieldsOf(change: StateChange, before: Row): string[] {
  switch (change.kind) {
    case "switch":
      return [...change.loads.map((l) => `load:${l.loadId}`), ...(change.positions ?? []).map((p) => `switch:${p.switchId}`)];
    case "mode":
      return ["mode", ...Object.keys(before.switches).map((id) => `load:${id}`)];
    case "soc":
      return [change.bankId ? `soc:${change.bankId}` : "soc"];
    case "place":
      return [...(change.place ? ["place"] : []), ...(change.weather ? ["weather"] : [])];
  }
}

export interface WriteInput {
  rigId: string;
  userId: string | null;
  write: StateWrite;
  /** The rig's as-built model (for the switch history when a mode is applied). */
  model: RigModel;
  /** When the server received the request; the last writer by this time wins. */
  receivedAt?: Date;
}

/** Applies one change under a row lock. Never throws for a conflict: the answer says what was lost. */
export async function writeRigState(db: Db, input: WriteInput): Promise<StateWriteResult> {
  const receivedAt = input.receivedAt ?? new Date();
  const at = receivedAt.toISOString();
  const { change, baseVersion, clientTime } = input.write;
  const row = await db.transaction(async (tx) => {
    await tx.insert(rigState).values({ rigId: input.rigId }).onConflictDoNothing();
    const [before] = await tx.select().from(rigState).where(eq(rigState.rigId, input.rigId)).for("update");
    if (!before) throw new Error("rig_state row vanished");
    const times = { ...(before.fieldTimes as Record<string, FieldTime>) };
    const lost: Superseded[] = [];
    const replaced: Superseded[] = [];
    const wins = new Set<string>();
    for (const field of fieldsOf(change, before)) {
      const t = times[field];
      if (t && t.at > at) {
        lost.push({ field, by: t.by, at: t.at });
        continue;
      }
      wins.add(field);
      if (t && t.v > baseVersion && t.by !== input.userId) replaced.push({ field, by: t.by, at: t.at });
    }
    const version = wins.size ? before.version + 1 : before.version;
    for (const field of wins) times[field] = { at, by: input.userId, v: version };

    const next: Partial<typeof rigState.$inferInsert> = {};
    const history: (typeof switchChanges.$inferInsert)[] = [];
    const common = { rigId: input.rigId, authorId: input.userId, clientTime: clientTime ? new Date(clientTime) : null, serverTime: receivedAt };
    switch (change.kind) {
      case "switch": {
        const switches = { ...before.switches };
        for (const l of change.loads) {
          const won = wins.has(`load:${l.loadId}`);
          if (won) switches[l.loadId] = l.on;
          history.push({ ...common, loadId: l.loadId, on: l.on, applied: won });
        }
        const positions = { ...before.positions };
        for (const p of change.positions ?? []) if (wins.has(`switch:${p.switchId}`)) positions[p.switchId] = p.position;
        next.switches = switches;
        next.positions = positions;
        break;
      }
      case "mode": {
        if (wins.has("mode")) {
          const was = effectiveLoadsOn(input.model, before.modeId, before.switches);
          // Overrides written later than this request survive the mode change.
          const kept: Record<string, boolean> = {};
          for (const [loadId, on] of Object.entries(before.switches)) if (!wins.has(`load:${loadId}`)) kept[loadId] = on;
          const now = effectiveLoadsOn(input.model, change.modeId, kept);
          for (const load of input.model.loads) {
            if (was.has(load.id) !== now.has(load.id)) history.push({ ...common, loadId: load.id, on: now.has(load.id), modeId: change.modeId });
          }
          next.modeId = change.modeId;
          next.switches = kept;
        }
        break;
      }
      case "soc":
        if (change.bankId !== undefined) {
          // Another bank's SoC (the primary bank's stays in the soc_* columns).
          if (wins.has(`soc:${change.bankId}`)) next.bankSocs = { ...(before.bankSocs ?? {}), [change.bankId]: change.soc };
        } else if (wins.has("soc")) {
          next.socPct = change.soc.socPct;
          next.socSource = change.soc.source;
          next.socRestingV = change.soc.restingV ?? null;
          next.socTakenAt = new Date(change.soc.takenAt);
        }
        break;
      case "place":
        if (change.place && wins.has("place")) next.place = change.place;
        if (change.weather && wins.has("weather")) next.weather = change.weather;
        break;
    }
    let after = before;
    if (wins.size) {
      const [updated] = await tx
        .update(rigState)
        .set({ ...next, version, fieldTimes: times, updatedAt: receivedAt, updatedBy: input.userId })
        .where(eq(rigState.rigId, input.rigId))
        .returning();
      after = updated!;
    }
    if (history.length) await tx.insert(switchChanges).values(history);
    return { after, lost, replaced };
  });
  const names = await authorNames(db, row.after, [...row.lost, ...row.replaced].map((x) => x.by));
  const named = (s: Superseded): Superseded => {
    const byName = s.by ? names.get(s.by) : undefined;
    return byName ? { ...s, byName } : s;
  };
  return {
    state: rowToState(row.after, names),
    superseded: row.lost.length > 0,
    lostFields: row.lost.map(named),
    replaced: row.replaced.map(named),
  };
}

/** Recent switch history of a rig, newest first. */
export async function listSwitchChanges(db: Db, rigId: string, limit = 50) {
  return db.select().from(switchChanges).where(eq(switchChanges.rigId, rigId)).orderBy(desc(switchChanges.serverTime), desc(switchChanges.id)).limit(limit);
}

/** The newest logbook reading that carries a SoC or a bank voltage (for "take the latest reading"). */
export async function getLatestReading(db: Db, rigId: string): Promise<LatestReading | null> {
  const [row] = await db
    .select({ id: readings.id, takenAt: readings.takenAt, socPct: readings.socPct, bankVoltageV: readings.bankVoltageV, currentA: readings.currentA })
    .from(readings)
    .where(and(eq(readings.rigId, rigId), isNull(readings.deletedAt), or(isNotNull(readings.socPct), isNotNull(readings.bankVoltageV))))
    .orderBy(desc(readings.takenAt))
    .limit(1);
  if (!row) return null;
  return {
    id: row.id,
    takenAt: row.takenAt.toISOString(),
    socPct: row.socPct,
    bankVoltageV: row.bankVoltageV,
    currentA: row.currentA,
  };
}
