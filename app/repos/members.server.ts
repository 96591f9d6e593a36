/**
 * Who is on a rig: members with roles, invitations by e-mail, and the rule that a rig always
 * keeps at least one owner. Changes that could remove the last owner lock the rig row first,
 * so two owners demoting each other at the same moment cannot leave the rig without one.
 */
import { randomBytes } from "node:crypto";
import { and, asc, eq, gt, inArray, isNull, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { rigInvites, rigMembers, rigs, users } from "~/db/schema";
import type { Role } from "~/auth/roles";
import { hashOf } from "~/auth/limits.server";
import { INVITE_DAYS } from "~/auth/constants";


/** A change refused by a rule people can understand; the message is shown as is. */
export class MembershipError extends Error {
  override name = "MembershipError";
  constructor(
    readonly code: "last_owner" | "already_member" | "not_member" | "invite_unusable" | "wrong_account",
    message: string,
  ) {
    super(message);
  }
}

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

export async function listMembers(db: Db, rigId: string) {
  return db
    .select({ userId: users.id, name: users.name, email: users.email, role: rigMembers.role, since: rigMembers.createdAt })
    .from(rigMembers)
    .innerJoin(users, eq(users.id, rigMembers.userId))
    .where(eq(rigMembers.rigId, rigId))
    .orderBy(sql`case ${rigMembers.role} when 'owner' then 0 when 'crew' then 1 else 2 end`, asc(users.name), asc(users.email));
}

export async function listPendingInvites(db: Db, rigId: string, now = new Date()) {
  return db
    .select({ id: rigInvites.id, email: rigInvites.email, role: rigInvites.role, expiresAt: rigInvites.expiresAt, createdAt: rigInvites.createdAt })
    .from(rigInvites)
    .where(
      and(eq(rigInvites.rigId, rigId), isNull(rigInvites.acceptedAt), isNull(rigInvites.revokedAt), gt(rigInvites.expiresAt, now)),
    )
    .orderBy(asc(rigInvites.createdAt));
}

async function lockRig(tx: Tx, rigId: string) {
  await tx.execute(sql`select id from ${rigs} where id = ${rigId} for update`);
}

async function ownerCount(tx: Tx, rigId: string): Promise<number> {
  const [row] = await tx
    .select({ n: sql<number>`count(*)::int` })
    .from(rigMembers)
    .where(and(eq(rigMembers.rigId, rigId), eq(rigMembers.role, "owner")));
  return row?.n ?? 0;
}

/**
 * Invites an address to a rig with a role. Answers the invite and its secret token (for the
 * link; only its hash is stored). A pending invite to the same address is replaced.
 */
export async function createInvite(
  db: Db,
  input: { rigId: string; email: string; role: Role; invitedBy: string; now?: Date },
) {
  const email = input.email.trim().toLowerCase();
  const now = input.now ?? new Date();
  return db.transaction(async (tx) => {
    const [member] = await tx
      .select({ userId: users.id })
      .from(rigMembers)
      .innerJoin(users, eq(users.id, rigMembers.userId))
      .where(and(eq(rigMembers.rigId, input.rigId), eq(sql`lower(${users.email})`, email)));
    if (member) throw new MembershipError("already_member", `${email} is already on this rig.`);
    await tx
      .update(rigInvites)
      .set({ revokedAt: now })
      .where(
        and(eq(rigInvites.rigId, input.rigId), eq(rigInvites.email, email), isNull(rigInvites.acceptedAt), isNull(rigInvites.revokedAt)),
      );
    const token = randomBytes(32).toString("base64url");
    const [invite] = await tx
      .insert(rigInvites)
      .values({
        rigId: input.rigId,
        email,
        role: input.role,
        tokenHash: hashOf(token),
        invitedBy: input.invitedBy,
        createdAt: now,
        expiresAt: new Date(now.getTime() + INVITE_DAYS * 86_400_000),
      })
      .returning();
    if (!invite) throw new Error("invite insert returned nothing");
    return { invite, token };
  });
}

/** Revokes a pending invite of this rig; answers whether one was revoked. */
export async function revokeInvite(db: Db, rigId: string, inviteId: string): Promise<boolean> {
  const revoked = await db
    .update(rigInvites)
    .set({ revokedAt: new Date() })
    .where(and(eq(rigInvites.id, inviteId), eq(rigInvites.rigId, rigId), isNull(rigInvites.acceptedAt), isNull(rigInvites.revokedAt)))
    .returning({ id: rigInvites.id });
  return revoked.length > 0;
}

export type InviteStatus = "pending" | "expired" | "revoked" | "accepted";

/** The invite behind a link's token, with its rig's name and whether it can still be used. */
export async function findInvite(db: Db, token: string, now = new Date()) {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) return null;
  const [row] = await db
    .select({
      id: rigInvites.id,
      rigId: rigInvites.rigId,
      rigName: rigs.name,
      email: rigInvites.email,
      role: rigInvites.role,
      expiresAt: rigInvites.expiresAt,
      acceptedAt: rigInvites.acceptedAt,
      revokedAt: rigInvites.revokedAt,
      inviterName: users.name,
    })
    .from(rigInvites)
    .innerJoin(rigs, eq(rigs.id, rigInvites.rigId))
    .leftJoin(users, eq(users.id, rigInvites.invitedBy))
    .where(eq(rigInvites.tokenHash, hashOf(token)));
  if (!row) return null;
  const status: InviteStatus = row.acceptedAt
    ? "accepted"
    : row.revokedAt
      ? "revoked"
      : row.expiresAt <= now
        ? "expired"
        : "pending";
  return { ...row, status };
}

export const inviteProblem: Record<Exclude<InviteStatus, "pending">, string> = {
  accepted: "This invitation has already been used. Ask the rig's owner for a new one if you need it.",
  revoked: "The rig's owner withdrew this invitation.",
  expired: `This invitation has expired (they last ${INVITE_DAYS} days). Ask the rig's owner for a new one.`,
};

/**
 * Accepts an invite as `user`: the address must match, and the invite must be pending. Marking
 * it used and adding the membership happen together, so a link works exactly once.
 */
export async function acceptInvite(db: Db, token: string, user: { id: string; email: string }, now = new Date()) {
  return db.transaction(async (tx) => {
    const [invite] = await tx
      .update(rigInvites)
      .set({ acceptedAt: now, acceptedBy: user.id })
      .where(
        and(
          eq(rigInvites.tokenHash, hashOf(token)),
          eq(rigInvites.email, user.email.toLowerCase()),
          isNull(rigInvites.acceptedAt),
          isNull(rigInvites.revokedAt),
          gt(rigInvites.expiresAt, now),
        ),
      )
      .returning({ rigId: rigInvites.rigId, role: rigInvites.role });
    if (!invite) {
      const found = await findInvite(db, token, now);
      if (found && found.status === "pending") {
        throw new MembershipError("wrong_account", `This invitation is for ${found.email}. Sign in with that address to accept it.`);
      }
      throw new MembershipError("invite_unusable", found && found.status !== "pending" ? inviteProblem[found.status] : "This invitation link is not valid.");
    }
    const [added] = await tx
      .insert(rigMembers)
      .values({ rigId: invite.rigId, userId: user.id, role: invite.role })
      .onConflictDoNothing()
      .returning({ role: rigMembers.role });
    return { rigId: invite.rigId, role: invite.role, alreadyMember: !added };
  });
}

/** Takes the rig's membership lock and reads one member's row; not on the rig → `not_member`. */
async function lockAndRequireMember(tx: Tx, rigId: string, userId: string) {
  await lockRig(tx, rigId);
  const [member] = await tx
    .select({ role: rigMembers.role })
    .from(rigMembers)
    .where(and(eq(rigMembers.rigId, rigId), eq(rigMembers.userId, userId)));
  if (!member) throw new MembershipError("not_member", "That person is not on this rig.");
  return member;
}

/** Changes a member's role; refuses to take the rig's last owner away. */
export async function changeRole(db: Db, rigId: string, userId: string, role: Role) {
  await db.transaction(async (tx) => {
    const member = await lockAndRequireMember(tx, rigId, userId);
    if (member.role === "owner" && role !== "owner" && (await ownerCount(tx, rigId)) <= 1) {
      throw new MembershipError("last_owner", "A rig needs at least one owner. Make someone else owner first.");
    }
    await tx.update(rigMembers).set({ role }).where(and(eq(rigMembers.rigId, rigId), eq(rigMembers.userId, userId)));
  });
}

/** Removes a member (an owner removing someone, or a member leaving); never the last owner. */
export async function removeMember(db: Db, rigId: string, userId: string) {
  await db.transaction(async (tx) => {
    const member = await lockAndRequireMember(tx, rigId, userId);
    if (member.role === "owner" && (await ownerCount(tx, rigId)) <= 1) {
      throw new MembershipError(
        "last_owner",
        "A rig needs at least one owner. Make someone else owner before the last owner leaves.",
      );
    }
    await tx.delete(rigMembers).where(and(eq(rigMembers.rigId, rigId), eq(rigMembers.userId, userId)));
  });
}

/** Rigs where this person is the only owner: they go when the account goes. */
export async function soleOwnedRigs(db: Db, userId: string) {
  const owned = await db
    .select({ id: rigs.id, name: rigs.name })
    .from(rigMembers)
    .innerJoin(rigs, eq(rigs.id, rigMembers.rigId))
    .where(and(eq(rigMembers.userId, userId), eq(rigMembers.role, "owner")))
    .orderBy(asc(rigs.name));
  if (owned.length === 0) return [];
  const counts = await db
    .select({ rigId: rigMembers.rigId, n: sql<number>`count(*)::int` })
    .from(rigMembers)
    .where(and(inArray(rigMembers.rigId, owned.map((r) => r.id)), eq(rigMembers.role, "owner")))
    .groupBy(rigMembers.rigId);
  const owners = new Map(counts.map((c) => [c.rigId, c.n]));
  return owned.filter((r) => (owners.get(r.id) ?? 0) <= 1);
}

/**
 * Deletes an account and the rigs it alone owns. `confirmedRigIds` must be exactly the rigs the
 * person was shown; if that set changed meanwhile, nothing is deleted and the new set is thrown.
 */
export class RigSetChangedError extends Error {
  override name = "RigSetChangedError";
  constructor(readonly rigs: { id: string; name: string }[]) {
    super("The rigs that would be deleted have changed.");
  }
}

export async function deleteAccount(db: Db, userId: string, confirmedRigIds: string[]) {
  return db.transaction(async (tx) => {
    await tx.execute(sql`select id from ${users} where id = ${userId} for update`);
    const sole = await soleOwnedRigs(tx as unknown as Db, userId);
    const same = sole.length === confirmedRigIds.length && sole.every((r) => confirmedRigIds.includes(r.id));
    if (!same) throw new RigSetChangedError(sole);
    if (sole.length) await tx.delete(rigs).where(inArray(rigs.id, sole.map((r) => r.id)));
    await tx.delete(users).where(eq(users.id, userId));
    return { deletedRigs: sole };
  });
}
