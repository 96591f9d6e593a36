// Everything stored about one rig that a write could touch, for "nothing changed" checks.
import { asc, eq } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { modelBranches, modelRevisions, readings, rigInvites, rigMembers, rigs, rigState, syncChanges } from "~/db/schema";

export async function rigSnapshot(db: Db, rigId: string) {
  const branches = await db.select().from(modelBranches).where(eq(modelBranches.rigId, rigId)).orderBy(asc(modelBranches.id));
  const revisions = await db
    .select({ branchId: modelRevisions.branchId, revision: modelRevisions.revision, document: modelRevisions.document })
    .from(modelRevisions)
    .innerJoin(modelBranches, eq(modelBranches.id, modelRevisions.branchId))
    .where(eq(modelBranches.rigId, rigId))
    .orderBy(asc(modelRevisions.branchId), asc(modelRevisions.revision));
  return {
    rig: await db.select().from(rigs).where(eq(rigs.id, rigId)),
    branches,
    revisions,
    readings: await db.select().from(readings).where(eq(readings.rigId, rigId)).orderBy(asc(readings.id)),
    members: await db.select().from(rigMembers).where(eq(rigMembers.rigId, rigId)).orderBy(asc(rigMembers.userId)),
    invites: await db.select().from(rigInvites).where(eq(rigInvites.rigId, rigId)).orderBy(asc(rigInvites.id)),
    log: await db.select().from(syncChanges).where(eq(syncChanges.rigId, rigId)).orderBy(asc(syncChanges.cursor)),
    state: await db.select().from(rigState).where(eq(rigState.rigId, rigId)),
  };
}

/**
 * A fingerprint of every rig except `exceptRigId`: per table, per rig, an md5 of its rows in a
 * fixed order. Equal fingerprints mean nothing about those rigs changed (one query per table).
 */
export async function otherRigsFingerprint(db: Db, exceptRigId: string): Promise<Record<string, Record<string, string>>> {
  const tables: Record<string, string> = {
    rigs: `select id as rig_id, md5(row_to_json(t)::text) as h from rigs t where id <> $1`,
    readings: `select rig_id, md5(string_agg(row_to_json(t)::text, ',' order by id)) as h from readings t where rig_id <> $1 group by rig_id`,
    rig_members: `select rig_id, md5(string_agg(row_to_json(t)::text, ',' order by user_id)) as h from rig_members t where rig_id <> $1 group by rig_id`,
    rig_invites: `select rig_id, md5(string_agg(row_to_json(t)::text, ',' order by id)) as h from rig_invites t where rig_id <> $1 group by rig_id`,
    sync_changes: `select rig_id, md5(string_agg(row_to_json(t)::text, ',' order by cursor)) as h from sync_changes t where rig_id <> $1 group by rig_id`,
    model_branches: `select rig_id, md5(string_agg(row_to_json(t)::text, ',' order by id)) as h from model_branches t where rig_id <> $1 group by rig_id`,
    model_revisions: `select b.rig_id, md5(string_agg(row_to_json(r)::text, ',' order by r.branch_id, r.revision)) as h from model_revisions r join model_branches b on b.id = r.branch_id where b.rig_id <> $1 group by b.rig_id`,
    rig_state: `select rig_id, md5(row_to_json(t)::text) as h from rig_state t where rig_id <> $1`,
  };
  const out: Record<string, Record<string, string>> = {};
  const client = (db as unknown as { $client: { query: (q: string, p: unknown[]) => Promise<{ rows: Array<{ rig_id: string; h: string }> }> } }).$client;
  for (const [name, query] of Object.entries(tables)) {
    const { rows } = await client.query(query, [exceptRigId]);
    out[name] = Object.fromEntries(rows.map((r) => [r.rig_id, r.h]));
  }
  return out;
}
