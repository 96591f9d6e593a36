import { afterAll, afterEach, beforeEach, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import { rigMembers, rigs, users } from "~/db/schema";
import { setMailSender, type Mail } from "~/mail/mailer.server";
import { createRig, listRigsForUser } from "~/repos/rigs.server";
import { starterModel } from "~/repos/starter-model";
import {
  acceptInvite,
  changeRole,
  createInvite,
  deleteAccount,
  findInvite,
  MembershipError,
  removeMember,
  revokeInvite,
  RigSetChangedError,
  soleOwnedRigs,
} from "~/repos/members.server";
import * as membersRoute from "~/routes/rig.members";
import * as inviteRoute from "~/routes/invite";
import * as rigsRoute from "~/routes/rigs";
import * as accountRoute from "~/routes/account";
import { getAsBuilt } from "~/repos/rigs.server";
import { validateModel } from "~/engine/model";
import { openTestDb } from "./db";
import { callRoute, makeUser, sessionCookieFor } from "./auth";

const { db, pool } = openTestDb();
afterAll(() => pool.end());
let outbox: Mail[] = [];
beforeEach(() => {
  outbox = [];
  setMailSender(async (mail) => void outbox.push(mail));
});
afterEach(() => setMailSender(null));

async function rigOf(ownerId: string, name = "Test van") {
  const { rig } = await createRig(db, { name, ownerId, document: starterModel({ name }) });
  return rig;
}

async function refusal(promise: Promise<unknown>): Promise<string> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof MembershipError) return error.code;
    throw error;
  }
  return "accepted";
}

describe("Creating a rig", () => {
  test("a signed-in person creates a rig, owns it, and its starter model is valid", async () => {
    const ada = await makeUser(db, "Ada");
    const cookie = await sessionCookieFor(db, ada.id);
    const created = await callRoute(rigsRoute.action, { path: "/rigs", cookie, form: { name: "  Kestrel " } });
    expect(created.status).toBe(302);
    const rigId = created.location!.split("/").pop()!;
    expect(await listRigsForUser(db, ada.id)).toEqual([expect.objectContaining({ id: rigId, name: "Kestrel", role: "owner" })]);
    const asBuilt = await getAsBuilt(db, rigId);
    expect(validateModel(asBuilt!.document).ok).toBe(true);
  });

  test("an empty name is answered 400 with a message and nothing is created", async () => {
    const ada = await makeUser(db, "Ada");
    const cookie = await sessionCookieFor(db, ada.id);
    const res = await callRoute(rigsRoute.action, { path: "/rigs", cookie, form: { name: "   " } });
    expect(res.status).toBe(400);
    expect(res.body).toMatchObject({ result: { status: "error", error: { name: [expect.stringMatching(/Name the rig/)] } } });
    expect(await listRigsForUser(db, ada.id)).toEqual([]);
  });
});

describe("Invitations", () => {
  test("an owner invites by e-mail; the invited address accepts once and joins with the chosen role", async () => {
    const ada = await makeUser(db, "Ada");
    const noor = await makeUser(db, "Noor");
    const rig = await rigOf(ada.id);
    const cookie = await sessionCookieFor(db, ada.id);
    const sent = await callRoute(membersRoute.action, {
      path: `/rigs/${rig.id}/members`,
      params: { rigId: rig.id },
      cookie,
      form: { intent: "invite", email: noor.email.toUpperCase(), role: "guest" },
    });
    expect(sent.status).toBe(200);
    expect(outbox).toHaveLength(1);
    expect(outbox[0]!.to).toBe(noor.email);
    expect(outbox[0]!.html).toContain("Accept the invitation");
    const token = /\/invites\/([A-Za-z0-9_-]+)/.exec(outbox[0]!.text)![1]!;

    const noorCookie = await sessionCookieFor(db, noor.id);
    const accepted = await callRoute(inviteRoute.action, { path: `/invites/${token}`, params: { token }, cookie: noorCookie, form: {} });
    expect(accepted.status).toBe(302);
    expect(accepted.location).toBe(`/rigs/${rig.id}`);
    expect(await listRigsForUser(db, noor.id)).toEqual([expect.objectContaining({ id: rig.id, role: "guest" })]);

    const again = await callRoute(inviteRoute.action, { path: `/invites/${token}`, params: { token }, cookie: noorCookie, form: {} });
    expect(again.status).toBe(410);
    const page = await callRoute(inviteRoute.loader, { path: `/invites/${token}`, params: { token }, cookie: noorCookie });
    expect(page.status).toBe(410);
  });

  test("accepting needs signing in as the invited address", async () => {
    const ada = await makeUser(db, "Ada");
    const sam = await makeUser(db, "Sam");
    const rig = await rigOf(ada.id);
    const { token } = await createInvite(db, { rigId: rig.id, email: "someone-else@example.net", role: "crew", invitedBy: ada.id });
    expect(await refusal(acceptInvite(db, token, sam))).toBe("wrong_account");
    const res = await callRoute(inviteRoute.action, {
      path: `/invites/${token}`,
      params: { token },
      cookie: await sessionCookieFor(db, sam.id),
      form: {},
    });
    expect(res.status).toBe(403);
    expect((await findInvite(db, token))?.status).toBe("pending");
  });

  test("an invite expires after 7 days", async () => {
    const ada = await makeUser(db, "Ada");
    const sam = await makeUser(db, "Sam");
    const rig = await rigOf(ada.id);
    const sent = new Date(Date.now() - 7 * 86_400_000 - 1000);
    const { token } = await createInvite(db, { rigId: rig.id, email: sam.email, role: "crew", invitedBy: ada.id, now: sent });
    expect((await findInvite(db, token))?.status).toBe("expired");
    expect(await refusal(acceptInvite(db, token, sam))).toBe("invite_unusable");
    const fresh = await createInvite(db, { rigId: rig.id, email: sam.email, role: "crew", invitedBy: ada.id, now: new Date(Date.now() - 6 * 86_400_000) });
    expect(await refusal(acceptInvite(db, fresh.token, sam))).toBe("accepted");
  });

  test("a revoked invite no longer works, and a new invite to the same address replaces the old one", async () => {
    const ada = await makeUser(db, "Ada");
    const sam = await makeUser(db, "Sam");
    const rig = await rigOf(ada.id);
    const first = await createInvite(db, { rigId: rig.id, email: sam.email, role: "crew", invitedBy: ada.id });
    const second = await createInvite(db, { rigId: rig.id, email: sam.email, role: "guest", invitedBy: ada.id });
    expect((await findInvite(db, first.token))?.status).toBe("revoked");
    const res = await callRoute(membersRoute.action, {
      path: `/rigs/${rig.id}/members`,
      params: { rigId: rig.id },
      cookie: await sessionCookieFor(db, ada.id),
      form: { intent: "revoke", inviteId: second.invite.id },
    });
    expect(res.status).toBe(200);
    expect(await refusal(acceptInvite(db, second.token, sam))).toBe("invite_unusable");
    expect(await revokeInvite(db, rig.id, second.invite.id)).toBe(false);
  });

  test("inviting someone already on the rig is answered 400, with the typed values kept", async () => {
    const ada = await makeUser(db, "Ada");
    const rig = await rigOf(ada.id);
    const res = await callRoute(membersRoute.action, {
      path: `/rigs/${rig.id}/members`,
      params: { rigId: rig.id },
      cookie: await sessionCookieFor(db, ada.id),
      form: { intent: "invite", email: ada.email, role: "crew" },
    });
    expect(res.status).toBe(400);
    expect(res.body).toMatchObject({
      intent: "invite",
      result: { error: { "": [expect.stringMatching(/already on this rig/)] }, initialValue: { email: ada.email, role: "crew" } },
    });
  });

  test("an unknown token is answered 404", async () => {
    const token = "x".repeat(43);
    const res = await callRoute(inviteRoute.loader, { path: `/invites/${token}`, params: { token } });
    expect(res.status).toBe(404);
  });
});

describe("A rig always keeps an owner", () => {
  test("the only owner cannot be demoted, removed, or leave", async () => {
    const ada = await makeUser(db, "Ada");
    const rig = await rigOf(ada.id);
    expect(await refusal(changeRole(db, rig.id, ada.id, "crew"))).toBe("last_owner");
    expect(await refusal(removeMember(db, rig.id, ada.id))).toBe("last_owner");
    const left = await callRoute(membersRoute.action, {
      path: `/rigs/${rig.id}/members`,
      params: { rigId: rig.id },
      cookie: await sessionCookieFor(db, ada.id),
      form: { intent: "leave" },
    });
    expect(left.status).toBe(400);
    expect(left.body).toMatchObject({ intent: "leave", result: { error: { "": [expect.stringMatching(/at least one owner/)] } } });
  });

  test("with two owners, one may step down; when both try at once, exactly one succeeds", async () => {
    const ada = await makeUser(db, "Ada");
    const sam = await makeUser(db, "Sam");
    const rig = await rigOf(ada.id);
    await db.insert(rigMembers).values({ rigId: rig.id, userId: sam.id, role: "owner" });
    const results = await Promise.allSettled([changeRole(db, rig.id, ada.id, "crew"), changeRole(db, rig.id, sam.id, "guest")]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const owners = await db.select().from(rigMembers).where(eq(rigMembers.rigId, rig.id));
    expect(owners.filter((m) => m.role === "owner")).toHaveLength(1);
  });

  test("crew and guests can leave; owners change roles and remove members", async () => {
    const ada = await makeUser(db, "Ada");
    const sam = await makeUser(db, "Sam");
    const noor = await makeUser(db, "Noor");
    const rig = await rigOf(ada.id);
    await db.insert(rigMembers).values([
      { rigId: rig.id, userId: sam.id, role: "guest" },
      { rigId: rig.id, userId: noor.id, role: "guest" },
    ]);
    const adaCookie = await sessionCookieFor(db, ada.id);
    const call = (cookie: string, form: Record<string, string>) =>
      callRoute(membersRoute.action, { path: `/rigs/${rig.id}/members`, params: { rigId: rig.id }, cookie, form });
    expect((await call(adaCookie, { intent: "role", userId: sam.id, role: "crew" })).status).toBe(200);
    expect((await listRigsForUser(db, sam.id))[0]?.role).toBe("crew");
    const samCookie = await sessionCookieFor(db, sam.id);
    expect((await call(samCookie, { intent: "remove", userId: noor.id })).status).toBe(403);
    expect((await call(adaCookie, { intent: "remove", userId: noor.id })).status).toBe(200);
    const left = await call(samCookie, { intent: "leave" });
    expect(left.status).toBe(302);
    expect(await listRigsForUser(db, sam.id)).toEqual([]);
  });

  test("guests get no pending invitations from the members page (owners only)", async () => {
    const ada = await makeUser(db, "Ada");
    const noor = await makeUser(db, "Noor");
    const rig = await rigOf(ada.id);
    await db.insert(rigMembers).values({ rigId: rig.id, userId: noor.id, role: "guest" });
    await createInvite(db, { rigId: rig.id, email: "pending@example.net", role: "crew", invitedBy: ada.id });
    const asGuest = await callRoute(membersRoute.loader, { path: `/rigs/${rig.id}/members`, params: { rigId: rig.id }, cookie: await sessionCookieFor(db, noor.id) });
    expect(asGuest.body).toMatchObject({ role: "guest", invites: [] });
    const asOwner = await callRoute(membersRoute.loader, { path: `/rigs/${rig.id}/members`, params: { rigId: rig.id }, cookie: await sessionCookieFor(db, ada.id) });
    expect((asOwner.body as { invites: unknown[] }).invites).toHaveLength(1);
  });
});

describe("Deleting an account", () => {
  test("deleting an account deletes the rigs the person alone owns, after a confirmation naming them; shared rigs stay", async () => {
    const ada = await makeUser(db, "Ada");
    const sam = await makeUser(db, "Sam");
    const mine = await rigOf(ada.id, "Solo van");
    const shared = await rigOf(ada.id, "Shared boat");
    await db.insert(rigMembers).values([
      { rigId: shared.id, userId: sam.id, role: "owner" },
      { rigId: mine.id, userId: sam.id, role: "crew" },
    ]);
    expect(await soleOwnedRigs(db, ada.id)).toEqual([{ id: mine.id, name: "Solo van" }]);
    const cookie = await sessionCookieFor(db, ada.id);
    const page = await callRoute(accountRoute.loader, { path: "/account", cookie });
    expect(page.body).toMatchObject({ soleRigs: [{ name: "Solo van" }] });

    const unconfirmed = await callRoute(accountRoute.action, { path: "/account", cookie, form: { intent: "delete", rigIds: mine.id } });
    expect(unconfirmed.status).toBe(400);
    expect(unconfirmed.body).toMatchObject({ result: { error: { confirm: [expect.stringMatching(/Tick the box/)] } } });
    const stale = await callRoute(accountRoute.action, { path: "/account", cookie, form: { intent: "delete", rigIds: "", confirm: "on" } });
    expect(stale.status).toBe(409);
    expect(stale.body).toMatchObject({ soleRigs: [{ name: "Solo van" }], result: { error: { "": [expect.stringMatching(/have changed/)] } } });

    const done = await callRoute(accountRoute.action, { path: "/account", cookie, form: { intent: "delete", rigIds: mine.id, confirm: "on" } });
    expect(done.status).toBe(302);
    expect(await db.select().from(users).where(eq(users.id, ada.id))).toEqual([]);
    expect(await db.select().from(rigs).where(eq(rigs.id, mine.id))).toEqual([]);
    expect(await listRigsForUser(db, sam.id)).toEqual([expect.objectContaining({ id: shared.id, role: "owner" })]);
  });

  test("deleting is refused when the set of rigs changed after the person confirmed", async () => {
    const ada = await makeUser(db, "Ada");
    const rig = await rigOf(ada.id);
    await expect(deleteAccount(db, ada.id, [])).rejects.toBeInstanceOf(RigSetChangedError);
    expect(await db.select().from(rigs).where(eq(rigs.id, rig.id))).toHaveLength(1);
  });
});
