/**
 * Rig authorization. A rig a person cannot see answers 404 (its existence is not revealed);
 * a rig they can see but not change answers 403.
 */
import { and, eq } from "drizzle-orm";
import { data } from "react-router";
import { getDb, type Db } from "~/db/db.server";
import { rigMembers, rigs } from "~/db/schema";
import { apiError, notFound } from "~/lib/http";
import { isUuid } from "~/lib/ids";
import { hasRole, type Role } from "./roles";
import { getUser, isApiRequest, requireUser, type SessionUser } from "./session.server";

export type RigAccess = { user: SessionUser; role: Role; rig: { id: string; name: string } };

async function findMembership(db: Db, rigId: string, userId: string) {
  const [row] = await db
    .select({ role: rigMembers.role, id: rigs.id, name: rigs.name })
    .from(rigMembers)
    .innerJoin(rigs, eq(rigs.id, rigMembers.rigId))
    .where(and(eq(rigMembers.rigId, rigId), eq(rigMembers.userId, userId)));
  return row ?? null;
}

export function rigNotFound(request: Request): never {
  if (isApiRequest(request)) throw apiError(404, "not_found", "There is no such rig, or it is not shared with you.");
  throw notFound("There is no such rig, or it is not shared with you.");
}

export function forbidden(request: Request, message: string): never {
  if (isApiRequest(request)) throw apiError(403, "forbidden", message);
  throw data({ message }, { status: 403 });
}

/**
 * The person's role on a rig, or null when they are signed out, not a member, or the id is not
 * a rig. For loaders that show different UI per role.
 */
export async function getRigAccess(request: Request, rigId: string | undefined, db: Db = getDb()): Promise<RigAccess | null> {
  const user = await getUser(request, db);
  if (!user || !isUuid(rigId)) return null;
  const row = await findMembership(db, rigId, user.id);
  return row ? { user, role: row.role, rig: { id: row.id, name: row.name } } : null;
}

/**
 * Signed in (else redirect / 401), a member of the rig (else 404), with at least `minimum`
 * (else 403). Returns the person, their role and the rig.
 */
export async function requireRigRole(
  request: Request,
  rigId: string | undefined,
  minimum: Role,
  db: Db = getDb(),
): Promise<RigAccess> {
  const user = await requireUser(request, db);
  if (!isUuid(rigId)) rigNotFound(request);
  const row = await findMembership(db, rigId, user.id);
  if (!row) rigNotFound(request);
  if (!hasRole(row.role, minimum)) {
    forbidden(request, minimum === "owner" ? "Only the rig's owners can do this." : "Guests follow this rig read-only.");
  }
  return { user, role: row.role, rig: { id: row.id, name: row.name } };
}

/** The rig named by a route's :rigId when this person is on it (for navigation), else null. */
export async function currentRigOf(userId: string, rigId: string | undefined, db: Db = getDb()) {
  if (!isUuid(rigId)) return null;
  const row = await findMembership(db, rigId, userId);
  return row ? { id: row.id, name: row.name, role: row.role } : null;
}
