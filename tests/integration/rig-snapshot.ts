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
