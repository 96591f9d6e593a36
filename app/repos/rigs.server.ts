import { and, asc, eq, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { modelBranches, modelRevisions, rigMembers, rigs } from "~/db/schema";
import { SCHEMA_VERSION, type RigModel } from "~/engine/model";
import type { Role } from "~/auth/roles";

/** The role on a rig (kept as a name for the repositories; the one list is `~/auth/roles`). */
export type RigRole = Role;

/** Thrown when a save names a revision that is no longer the head (answer 409). */
export class StaleRevisionError extends Error {
  override name = "StaleRevisionError";
  constructor(
    readonly branchId: string,
    readonly expectedRevision: number,
    readonly headRevision: number | null,
  ) {
    super(`Revision ${expectedRevision} is no longer the latest (the latest is ${headRevision ?? "unknown"}).`);
  }
}

/** Creates a rig, its owner membership and its "as built" model at revision 1. */
export async function createRig(
  db: Db,
  input: { name: string; ownerId: string | null; document: RigModel; message?: string },
) {
  return db.transaction(async (tx) => {
    const [rig] = await tx.insert(rigs).values({ name: input.name }).returning();
    if (!rig) throw new Error("rig insert returned nothing");
    if (input.ownerId) {
      await tx.insert(rigMembers).values({ rigId: rig.id, userId: input.ownerId, role: "owner" });
    }
    const [branch] = await tx
      .insert(modelBranches)
      .values({ rigId: rig.id, kind: "as_built", name: "As built", headRevision: 1 })
      .returning();
    if (!branch) throw new Error("branch insert returned nothing");
    await tx.insert(modelRevisions).values({
      branchId: branch.id,
      revision: 1,
      schemaVersion: SCHEMA_VERSION,
      document: input.document,
      message: input.message ?? "First revision",
      authorId: input.ownerId,
    });
    return { rig, branch };
  });
}

export async function getRig(db: Db, rigId: string) {
  const [rig] = await db.select().from(rigs).where(eq(rigs.id, rigId));
  return rig ?? null;
}

export async function listRigs(db: Db) {
  return db.select().from(rigs).orderBy(asc(rigs.createdAt), asc(rigs.name));
}

export async function listRigsForUser(db: Db, userId: string) {
  return db
    .select({ id: rigs.id, name: rigs.name, role: rigMembers.role, createdAt: rigs.createdAt })
    .from(rigMembers)
    .innerJoin(rigs, eq(rigs.id, rigMembers.rigId))
    .where(eq(rigMembers.userId, userId))
    .orderBy(asc(rigs.createdAt), asc(rigs.name));
}

/** The head revision of the rig's as-built branch: the rig as it is wired now. */
export async function getAsBuilt(db: Db, rigId: string) {
  const [row] = await db
    .select({
      branchId: modelBranches.id,
      revision: modelRevisions.revision,
      schemaVersion: modelRevisions.schemaVersion,
      document: modelRevisions.document,
      savedAt: modelRevisions.createdAt,
    })
    .from(modelBranches)
    .innerJoin(
      modelRevisions,
      and(eq(modelRevisions.branchId, modelBranches.id), eq(modelRevisions.revision, modelBranches.headRevision)),
    )
    .where(and(eq(modelBranches.rigId, rigId), eq(modelBranches.kind, "as_built")));
  return row ?? null;
}

/**
 * Appends a revision to a branch of rig `rigId`. `expectedRevision` must be the branch's head:
 * a stale number throws StaleRevisionError and nothing is written (never a silent overwrite).
 * A branch of another rig throws BranchNotInRigError (checked in the same statement).
 */
export async function saveRevision(
  db: Db,
  input: { rigId: string; branchId: string; expectedRevision: number; document: RigModel; authorId: string | null; message?: string },
) {
  return db.transaction(async (tx) => {
    const [moved] = await tx
      .update(modelBranches)
      .set({ headRevision: sql`${modelBranches.headRevision} + 1` })
      .where(
        and(
          eq(modelBranches.id, input.branchId),
          eq(modelBranches.rigId, input.rigId),
          eq(modelBranches.headRevision, input.expectedRevision),
        ),
      )
      .returning({ headRevision: modelBranches.headRevision });
    if (!moved) {
      const [branch] = await tx
        .select({ headRevision: modelBranches.headRevision })
        .from(modelBranches)
        .where(and(eq(modelBranches.id, input.branchId), eq(modelBranches.rigId, input.rigId)));
      if (!branch) throw new BranchNotInRigError(input.branchId, input.rigId);
      throw new StaleRevisionError(input.branchId, input.expectedRevision, branch?.headRevision ?? null);
    }
    const [revision] = await tx
      .insert(modelRevisions)
      .values({
        branchId: input.branchId,
        revision: moved.headRevision,
        schemaVersion: SCHEMA_VERSION,
        document: input.document,
        message: input.message ?? "",
        authorId: input.authorId,
      })
      .returning();
    if (!revision) throw new Error("revision insert returned nothing");
    return revision;
  });
}

/** The branch named is not one of this rig's (or does not exist). */
export class BranchNotInRigError extends Error {
  constructor(
    readonly branchId: string,
    readonly rigId: string,
  ) {
    super(`branch ${branchId} is not a branch of rig ${rigId}`);
  }
}

/** Opens a draft branch starting from a copy of the as-built head. */
export async function createDraft(db: Db, input: { rigId: string; name: string; authorId: string | null }) {
  const asBuilt = await getAsBuilt(db, input.rigId);
  if (!asBuilt) throw new Error(`rig ${input.rigId} has no as-built model`);
  return db.transaction(async (tx) => {
    const [branch] = await tx
      .insert(modelBranches)
      .values({ rigId: input.rigId, kind: "draft", name: input.name, headRevision: 1 })
      .returning();
    if (!branch) throw new Error("branch insert returned nothing");
    await tx.insert(modelRevisions).values({
      branchId: branch.id,
      revision: 1,
      schemaVersion: asBuilt.schemaVersion,
      document: asBuilt.document,
      message: `Draft from as built revision ${asBuilt.revision}`,
      authorId: input.authorId,
    });
    return branch;
  });
}
