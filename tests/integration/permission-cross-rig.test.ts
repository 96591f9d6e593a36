/**
 * Finding 3 of issue 9: a write that names an id of another rig (branch, reading, invitation,
 * member) changes nothing on that rig, whoever sends it. The cases live in
 * permission-matrix.ts (`crossRigCases`); this file runs each one twice: as the owner of the
 * URL's rig only, and as someone who owns both rigs.
 */
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { rigMembers } from "~/db/schema";
import { createInvite } from "~/repos/members.server";
import { createRig } from "~/repos/rigs.server";
import { applySync } from "~/repos/sync.server";
import { juniperModel } from "../fixtures/juniper";
import { openTestDb } from "./db";
import { rigSnapshot } from "./rig-snapshot";
import { callRoute, makeUser, sessionCookieFor } from "./auth";
import { crossRigCases, permissionMatrix, type CrossRigContext } from "./permission-matrix";
import { juniperReading, addChange } from "./sync-helpers";

const appDir = fileURLToPath(new URL("../../app/", import.meta.url));
const { db, pool } = openTestDb();
afterAll(() => pool.end());

let ctx: CrossRigContext;
let ownerOfThis: string;
let ownerOfBoth: string;

const snapshot = (rigId: string) => rigSnapshot(db, rigId);

beforeAll(async () => {
  const ada = await makeUser(db, "Ada");
  const both = await makeUser(db, "Both");
  const victim = await makeUser(db, "Victim");
  const victimCrew = await makeUser(db, "Crew");
  ownerOfThis = ada.id;
  ownerOfBoth = both.id;
  const mine = await createRig(db, { name: "Attacker van", ownerId: ada.id, document: juniperModel });
  const theirs = await createRig(db, { name: "Victim van", ownerId: victim.id, document: juniperModel });
  await db.insert(rigMembers).values([
    { rigId: mine.rig.id, userId: both.id, role: "owner" },
    { rigId: theirs.rig.id, userId: both.id, role: "owner" },
    { rigId: theirs.rig.id, userId: victimCrew.id, role: "crew" },
  ]);
  const reading = juniperReading(0);
  await applySync(db, { userId: victim.id, role: "owner" }, { rigId: theirs.rig.id, cursor: null, changes: [addChange(theirs.rig.id, reading)] });
  const { invite } = await createInvite(db, { rigId: theirs.rig.id, email: `guest-${crypto.randomUUID().slice(0, 6)}@juniper.example`, role: "guest", invitedBy: victim.id });
  ctx = {
    rigId: mine.rig.id,
    branchId: mine.branch.id,
    other: { rigId: theirs.rig.id, branchId: theirs.branch.id, readingId: reading.id, inviteId: invite.id, memberUserId: victimCrew.id },
  };
});

describe("Writes naming another rig's ids change nothing on that rig", () => {
  test("every case names a route that is in the permission matrix and has an action", async () => {
    for (const c of crossRigCases) {
      expect(permissionMatrix[c.file]?.POST, `${c.name}: ${c.file}`).toBeDefined();
    }
  });

  for (const c of crossRigCases) {
    for (const who of ["owner of this rig only", "owner of both rigs"] as const) {
      test(`${c.name} (${who})`, async () => {
        const mod = (await import(path.join(appDir, c.file))) as { action: unknown };
        const before = await snapshot(ctx.other.rigId);
        const cookie = await sessionCookieFor(db, who === "owner of both rigs" ? ownerOfBoth : ownerOfThis);
        const result = await callRoute(mod.action, {
          path: c.path(ctx),
          method: "POST",
          cookie,
          params: c.params(ctx),
          form: c.form?.(ctx),
          json: c.json?.(ctx),
        });
        expect(result.status, JSON.stringify(result.body)).toBeLessThan(500);
        const results = (result.body as { results?: Array<{ status: string }> }).results;
        if (results) expect(results.map((r) => r.status)).not.toContain("applied");
        expect(await snapshot(ctx.other.rigId)).toEqual(before);
      });
    }
  }
});
