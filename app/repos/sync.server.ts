/**
 * POST /api/sync's work: apply a phone's batch of changes in order, idempotently, then answer
 * the rig's changes since the phone's cursor.
 *
 * - Every write for a rig runs under that rig's advisory lock, so within a rig the change log's
 *   cursors become visible in order (a phone that has seen cursor N never misses one below N).
 * - A change id seen before answers `duplicate` and does nothing; a reading id seen before
 *   (sent again under a new change id) also answers `duplicate`. Readings are append-only
 *   facts: an add never overwrites, an edit is an explicit op by the author or an owner.
 * - Runs of reading adds are written with multi-row INSERT … ON CONFLICT DO NOTHING.
 * Conflict rules: DEVELOPERS.md, "Offline and sync".
 */
import { and, asc, eq, gt, gte, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { readings, syncChanges } from "~/db/schema";
import { validateModel, type RigModel } from "~/engine/model";
import { issuesOf } from "~/lib/http";
import {
  changeSchema,
  isChangeKind,
  MAX_PULL,
  payloadSchemas,
  type ChangeKind,
  type ChangePayload,
  type ChangeResult,
  type PulledChange,
  type SyncRequest,
  type SyncResponse,
} from "~/schemas/sync";
import { getAsBuiltModel } from "./models.server";
import { BranchNotInRigError, createDraft, getAsBuilt, saveRevision, StaleRevisionError, type RigRole } from "./rigs.server";
import { writeRigState } from "./rig-state.server";
import { checkChangeAgainstModel } from "~/schemas/rig-state";
import { toWire } from "./readings.server";
import { READING_VALUE_KEYS } from "~/schemas/readings";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export type SyncActor = { userId: string; role: RigRole };

type Parsed = { index: number; id: string; kind: ChangeKind; clientTime: Date; payload: unknown };

/** Rows per multi-row INSERT (13 columns × 1000 stays far below PostgreSQL's 65,535 parameters). */
const INSERT_CHUNK = 1000;

function refused(id: string, reason: Extract<ChangeResult, { status: "refused" }>["reason"], message: string, issues?: ReturnType<typeof issuesOf>): ChangeResult {
  return { id, status: "refused", reason, message, ...(issues ? { issues } : {}) };
}

/** Takes the rig's change-log lock for the rest of the transaction. */
export async function lockRigLog(tx: Tx | Db, rigId: string) {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${rigId}::text, 7))`);
}

/**
 * Puts a change made through another route (the Now screen's state or mode API) in the rig's
 * change log, so every phone's next sync hears of it and reads that part again.
 */
export async function recordServerChange(db: Db, input: { rigId: string; authorId: string; kind: "state.write" | "model.save"; entityId: string }) {
  await db.transaction(async (tx) => {
    await lockRigLog(tx, input.rigId);
    await logChanges(tx, [{ changeId: crypto.randomUUID(), rigId: input.rigId, kind: input.kind, entityId: input.entityId, authorId: input.authorId, clientTime: new Date() }]);
  });
}

export async function applySync(db: Db, actor: SyncActor, request: SyncRequest, opts: { receivedAt?: Date } = {}): Promise<SyncResponse> {
  const receivedAt = opts.receivedAt ?? new Date();
  const results: (ChangeResult | undefined)[] = new Array(request.changes.length);
  const work: Parsed[] = [];
  const idsInBatch = new Set<string>();

  request.changes.forEach((raw, index) => {
    const id = changeIdOf(raw);
    const envelope = changeSchema.safeParse(raw);
    if (!envelope.success) {
      results[index] = refused(id, "invalid", envelope.error.issues[0]?.message ?? "The change is not valid.", issuesOf(envelope.error));
      return;
    }
    const change = envelope.data;
    // Only an accepted change claims its id in this batch: a refused copy sent before the real
    // one (same id) must not turn the real one into a "duplicate" that was never applied.
    if (idsInBatch.has(change.id)) {
      results[index] = { id: change.id, status: "duplicate" };
      return;
    }
    if (change.rigId !== request.rigId) {
      results[index] = refused(change.id, "wrong_rig", "This change belongs to another rig; send it with that rig's sync.");
      return;
    }
    if (!isChangeKind(change.kind)) {
      results[index] = refused(change.id, "unsupported", `Tilldawn does not know the change "${change.kind}".`);
      return;
    }
    const kind = change.kind;
    const nul = pathToNul(change.payload);
    if (nul) {
      results[index] = refused(change.id, "invalid", "Text in this change contains a NUL character, which cannot be stored.", [{ path: ["payload", ...nul], message: "NUL character" }]);
      return;
    }
    const checked = payloadSchemas[kind].safeParse(change.payload);
    if (!checked.success) {
      results[index] = refused(change.id, "invalid", checked.error.issues[0]?.message ?? "The change is not valid.", issuesOf(checked.error));
      return;
    }
    if (actor.role === "guest") {
      results[index] = refused(change.id, "read_only", "Guests follow this rig read-only; the change was not saved.");
      return;
    }
    idsInBatch.add(change.id);
    work.push({ index, id: change.id, kind, clientTime: new Date(change.clientTime), payload: checked.data });
  });

  return db.transaction(async (tx) => {
    await lockRigLog(tx, request.rigId);

    if (work.length) {
      const seen = new Set<string>();
      for (let i = 0; i < work.length; i += INSERT_CHUNK) {
        const ids = work.slice(i, i + INSERT_CHUNK).map((w) => w.id);
        const rows = await tx.select({ id: syncChanges.changeId }).from(syncChanges).where(sql`${syncChanges.changeId} = any(${sql.param(ids)}::uuid[])`);
        for (const r of rows) seen.add(r.id);
      }
      const fresh = work.filter((w) => {
        if (!seen.has(w.id)) return true;
        results[w.index] = { id: w.id, status: "duplicate" };
        return false;
      });

      let model: RigModel | null | undefined;
      const ctx: Ctx = {
        tx,
        actor,
        rigId: request.rigId,
        receivedAt,
        model: async () => {
          if (model === undefined) {
            model = (await getAsBuiltModel(tx as unknown as Db, request.rigId))?.model ?? null;
          }
          return model;
        },
      };

      // In order; consecutive reading adds go to the database together.
      for (let i = 0; i < fresh.length; ) {
        if (fresh[i]!.kind === "reading.add") {
          let j = i;
          while (j < fresh.length && fresh[j]!.kind === "reading.add") j++;
          const run = fresh.slice(i, j);
          for (let k = 0; k < run.length; k += INSERT_CHUNK) await addReadingsSafely(ctx, run.slice(k, k + INSERT_CHUNK), results);
          i = j;
        } else {
          const one = fresh[i]!;
          results[one.index] = await inSavepoint(ctx, (inner) => applyOne(inner, one)).catch((error: unknown) => {
            if (!isDataError(error)) throw error;
            return refused(one.id, "invalid", "The change could not be stored (a value is out of range for the database).");
          });
          i++;
        }
      }
    }

    const pulled = await pullChanges(tx, request, idsInBatch);
    return {
      results: results.map((r, i) => r ?? refused(changeIdOf(request.changes[i]), "invalid", "The change could not be read.")),
      ...pulled,
      serverTime: receivedAt.toISOString(),
    };
  });
}

/** The id a phone gave a change, as far as it can be read (for the answer to a malformed one). */
function changeIdOf(raw: unknown): string {
  const id = typeof raw === "object" && raw !== null ? (raw as { id?: unknown }).id : undefined;
  return typeof id === "string" ? id.slice(0, 100) : "";
}

/** The path to the first string (or key) holding a NUL character, or null. */
export function pathToNul(value: unknown, path: (string | number)[] = [], depth = 0): (string | number)[] | null {
  if (typeof value === "string") return value.includes("\u0000") ? path : null;
  if (depth > 64 || typeof value !== "object" || value === null) return null;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const found = pathToNul(value[i], [...path, i], depth + 1);
      if (found) return found;
    }
    return null;
  }
  for (const [key, inner] of Object.entries(value)) {
    if (key.includes("\u0000")) return [...path, key];
    const found = pathToNul(inner, [...path, key], depth + 1);
    if (found) return found;
  }
  return null;
}

type Ctx = { tx: Tx; actor: SyncActor; rigId: string; receivedAt: Date; model: () => Promise<RigModel | null> };

async function logChanges(
  tx: Tx,
  rows: Array<{ changeId: string; rigId: string; kind: ChangeKind; entityId: string; authorId: string | null; clientTime: Date; payload?: unknown }>,
) {
  if (!rows.length) return;
  await tx.execute(sql`
    insert into sync_changes (change_id, rig_id, kind, entity_id, author_id, client_time, payload)
    select * from unnest(
      ${sql.param(rows.map((r) => r.changeId))}::uuid[],
      ${sql.param(rows.map((r) => r.rigId))}::uuid[],
      ${sql.param(rows.map((r) => r.kind))}::text[],
      ${sql.param(rows.map((r) => r.entityId))}::text[],
      ${sql.param(rows.map((r) => r.authorId))}::uuid[],
      ${sql.param(rows.map((r) => r.clientTime.toISOString()))}::timestamptz[],
      ${sql.param(rows.map((r) => (r.payload === undefined ? null : JSON.stringify(r.payload))))}::jsonb[]
    )
    on conflict (change_id) do nothing`);
}

/**
 * A PostgreSQL error about the data itself (class 22: out of range, bad encoding, bad time;
 * class 23: a constraint), which validation should have caught: the change is refused alone.
 */
function isDataError(error: unknown): boolean {
  const code = (error as { code?: unknown; cause?: { code?: unknown } })?.cause?.code ?? (error as { code?: unknown })?.code;
  return typeof code === "string" && (code.startsWith("22") || code.startsWith("23"));
}

/** Runs `work` in a savepoint: a failure rolls back only what it did, not the batch. */
function inSavepoint<T>(ctx: Ctx, work: (inner: Ctx) => Promise<T>): Promise<T> {
  return ctx.tx.transaction((sp) => work({ ...ctx, tx: sp as unknown as Tx }));
}

/** A run of adds in one statement; if the database refuses the run, each add on its own. */
async function addReadingsSafely(ctx: Ctx, run: Parsed[], results: (ChangeResult | undefined)[]) {
  try {
    await inSavepoint(ctx, (inner) => addReadings(inner, run, results));
  } catch (error) {
    if (!isDataError(error)) throw error;
    for (const item of run) {
      try {
        await inSavepoint(ctx, (inner) => addReadings(inner, [item], results));
      } catch (single) {
        if (!isDataError(single)) throw single;
        results[item.index] = refused(item.id, "invalid", "The reading could not be stored (a value is out of range for the database).");
      }
    }
  }
}

async function addReadings(ctx: Ctx, run: Parsed[], results: (ChangeResult | undefined)[]) {
  const firstByReading = new Map<string, Parsed>();
  for (const item of run) {
    const { reading } = item.payload as ChangePayload<"reading.add">;
    if (firstByReading.has(reading.id)) results[item.index] = { id: item.id, status: "duplicate" };
    else firstByReading.set(reading.id, item);
  }
  const items = [...firstByReading.values()];
  if (!items.length) return;
  // One statement per run: arrays bound once and unnested by PostgreSQL (cheaper to parse and
  // plan than a VALUES list with thousands of parameters).
  const col = <T,>(pick: (r: ChangePayload<"reading.add">["reading"]) => T) =>
    items.map((item) => pick((item.payload as ChangePayload<"reading.add">).reading));
  const pgArray = (values: unknown[]) => sql.param(values);
  const inserted = (
    await ctx.tx.execute<{ id: string }>(sql`
      insert into readings (id, rig_id, author_id, taken_at, bank_voltage_v, current_a, soc_pct, temperature_c, solar_wh_today, note, source, created_at, updated_at)
      select u.id, ${ctx.rigId}::uuid, ${ctx.actor.userId}::uuid, u.taken_at, u.v, u.a, u.soc, u.t, u.wh, u.note, u.source::reading_source, ${ctx.receivedAt.toISOString()}::timestamptz, ${ctx.receivedAt.toISOString()}::timestamptz
      from unnest(
        ${pgArray(col((r) => r.id))}::uuid[],
        ${pgArray(col((r) => r.takenAt))}::timestamptz[],
        ${pgArray(col((r) => r.bankVoltageV ?? null))}::real[],
        ${pgArray(col((r) => r.currentA ?? null))}::real[],
        ${pgArray(col((r) => r.socPct ?? null))}::real[],
        ${pgArray(col((r) => r.temperatureC ?? null))}::real[],
        ${pgArray(col((r) => r.solarWhToday ?? null))}::real[],
        ${pgArray(col((r) => r.note ?? ""))}::text[],
        ${pgArray(col((r) => r.source))}::text[]
      ) as u(id, taken_at, v, a, soc, t, wh, note, source)
      on conflict (id) do nothing
      returning id`)
  ).rows;
  const applied = new Set(inserted.map((r) => r.id));
  const log: Parameters<typeof logChanges>[1] = [];
  for (const item of items) {
    const readingId = (item.payload as ChangePayload<"reading.add">).reading.id;
    if (applied.has(readingId)) {
      results[item.index] = { id: item.id, status: "applied" };
      log.push({ changeId: item.id, rigId: ctx.rigId, kind: "reading.add", entityId: readingId, authorId: ctx.actor.userId, clientTime: item.clientTime });
    } else {
      results[item.index] = { id: item.id, status: "duplicate" };
    }
  }
  await logChanges(ctx.tx, log);
}

async function applyOne(ctx: Ctx, item: Parsed): Promise<ChangeResult> {
  const { tx, actor, rigId } = ctx;
  const base = { changeId: item.id, rigId, authorId: actor.userId, clientTime: item.clientTime };
  switch (item.kind) {
    case "reading.add":
      throw new Error("reading adds are applied in runs");
    case "reading.edit":
    case "reading.delete": {
      const payload = item.payload as ChangePayload<"reading.edit"> | ChangePayload<"reading.delete">;
      const [row] = await tx
        .select()
        .from(readings)
        .where(and(eq(readings.id, payload.readingId), eq(readings.rigId, rigId)))
        .for("update");
      if (!row) return refused(item.id, "not_found", "That reading is not in this rig's logbook.");
      if (row.authorId !== actor.userId && actor.role !== "owner") {
        return refused(item.id, "not_author", "Only the person who took a reading, or an owner, can change it.");
      }
      if (row.deletedAt) {
        return item.kind === "reading.delete"
          ? { id: item.id, status: "duplicate" }
          : refused(item.id, "deleted", "That reading was deleted, so the edit was not saved.");
      }
      if (item.kind === "reading.delete") {
        await tx.update(readings).set({ deletedAt: ctx.receivedAt, updatedAt: ctx.receivedAt }).where(eq(readings.id, row.id));
      } else {
        const { set } = payload as ChangePayload<"reading.edit">;
        const next: Partial<typeof readings.$inferInsert> = { updatedAt: ctx.receivedAt };
        if (set.takenAt !== undefined) next.takenAt = new Date(set.takenAt);
        for (const key of READING_VALUE_KEYS) if (set[key] !== undefined) next[key] = set[key];
        if (set.note !== undefined) next.note = set.note;
        await tx.update(readings).set(next).where(eq(readings.id, row.id));
      }
      await logChanges(tx, [{ ...base, kind: item.kind, entityId: row.id }]);
      return { id: item.id, status: "applied" };
    }
    case "state.write": {
      const model = await ctx.model();
      if (!model) return refused(item.id, "not_found", "This rig's model could not be read, so the change was not saved.");
      const write = item.payload as ChangePayload<"state.write">;
      const issues = checkChangeAgainstModel(model, write.change);
      if (issues.length) return refused(item.id, "invalid", issues[0]!.message, issues);
      const outcome = await writeRigState(tx as unknown as Db, { rigId, userId: actor.userId, write, model, receivedAt: ctx.receivedAt });
      await logChanges(tx, [{ ...base, kind: "state.write", entityId: "state" }]);
      return {
        id: item.id,
        status: "applied",
        detail: { superseded: outcome.superseded, lostFields: outcome.lostFields, version: outcome.state.version },
      };
    }
    case "model.save": {
      if (actor.role !== "owner") return refused(item.id, "owners_only", "Only the rig's owners can change its wiring model.");
      const payload = item.payload as ChangePayload<"model.save">;
      const checked = validateModel(payload.document);
      if (!checked.ok) {
        return refused(item.id, "invalid", "The model has problems; open it to fix them.", checked.issues);
      }
      const db = tx as unknown as Db;
      const branchId = payload.branchId ?? (await getAsBuilt(db, rigId))?.branchId;
      if (!branchId) return refused(item.id, "not_found", "This rig's model could not be found, so the change was not saved.");
      try {
        const saved = await saveRevision(db, {
          rigId,
          branchId,
          expectedRevision: payload.baseRevision,
          document: checked.model,
          authorId: actor.userId,
          message: payload.message ?? "Saved offline",
        });
        await logChanges(tx, [{ ...base, kind: "model.save", entityId: branchId }]);
        return { id: item.id, status: "applied", detail: { branchId, revision: saved.revision } };
      } catch (error) {
        if (error instanceof BranchNotInRigError) {
          return refused(item.id, "not_found", "That model branch is not one of this rig's, so the change was not saved.");
        }
        if (!(error instanceof StaleRevisionError)) throw error;
        // The as-built moved while this phone was offline: keep the edit as a draft to compare.
        const draft = await createDraft(db, { rigId, name: `Offline edit ${item.clientTime.toISOString().slice(0, 16).replace("T", " ")}`, authorId: actor.userId });
        const saved = await saveRevision(db, { rigId, branchId: draft.id, expectedRevision: 1, document: checked.model, authorId: actor.userId, message: payload.message ?? "Saved offline" });
        await logChanges(tx, [{ ...base, kind: "model.save", entityId: draft.id }]);
        return { id: item.id, status: "applied", detail: { becameDraft: true, branchId: draft.id, revision: saved.revision } };
      }
    }
  }
}

async function pullChanges(tx: Tx, request: SyncRequest, own: Set<string>): Promise<Pick<SyncResponse, "changes" | "cursor" | "more">> {
  const from = request.cursor ?? 0;
  const scan = MAX_PULL + own.size;
  const rows = await tx
    .select({ cursor: syncChanges.cursor, changeId: syncChanges.changeId, kind: syncChanges.kind, entityId: syncChanges.entityId })
    .from(syncChanges)
    .where(and(eq(syncChanges.rigId, request.rigId), gt(syncChanges.cursor, from)))
    .orderBy(asc(syncChanges.cursor))
    .limit(scan + 1);
  const more = rows.length > scan;
  const page = more ? rows.slice(0, scan) : rows;
  const cursor = page.length ? page[page.length - 1]!.cursor : from;

  // The latest change per entity is enough: the phone upserts the current row.
  const lastByEntity = new Map<string, { cursor: number; kind: string; entityId: string }>();
  for (const row of page) {
    if (own.has(row.changeId)) continue;
    const family = row.kind.split(".")[0]!;
    lastByEntity.set(`${family}:${row.entityId}`, row);
  }
  const readingIds = [...lastByEntity.values()].filter((r) => r.kind.startsWith("reading.")).map((r) => r.entityId);
  const found = new Map<string, typeof readings.$inferSelect>();
  for (let i = 0; i < readingIds.length; i += INSERT_CHUNK) {
    const ids = readingIds.slice(i, i + INSERT_CHUNK);
    const rows = await tx
      .select()
      .from(readings)
      .where(and(sql`${readings.id} = any(${sql.param(ids)}::uuid[])`, request.since ? gte(readings.takenAt, new Date(request.since)) : undefined));
    for (const r of rows) found.set(r.id, r);
  }
  const changes: PulledChange[] = [];
  for (const row of [...lastByEntity.values()].sort((a, b) => a.cursor - b.cursor)) {
    if (row.kind.startsWith("reading.")) {
      const reading = found.get(row.entityId);
      if (reading) changes.push({ cursor: row.cursor, kind: "reading", reading: toWire(reading) });
    } else if (row.kind === "state.write") {
      changes.push({ cursor: row.cursor, kind: "state" });
    } else if (row.kind === "model.save") {
      changes.push({ cursor: row.cursor, kind: "model" });
    }
  }
  return { changes, cursor, more };
}
