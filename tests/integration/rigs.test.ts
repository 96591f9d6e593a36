import { afterAll, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import { openTestDb } from "./db";
import { modelRevisions, users } from "~/db/schema";
import { createDraft, createRig, getAsBuilt, listRigsForUser, saveRevision, StaleRevisionError } from "~/repos/rigs.server";
import { juniperModel } from "../fixtures/juniper";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

async function newUser() {
  const [user] = await db
    .insert(users)
    .values({ email: `owner-${crypto.randomUUID()}@test.example`, name: "Owner" })
    .returning();
  return user!;
}

describe("Rig model revisions in PostgreSQL", () => {
  test("a new rig is written and read back through Drizzle with its owner and as-built model", async () => {
    const owner = await newUser();
    const { rig } = await createRig(db, { name: "Test van", ownerId: owner.id, document: juniperModel });
    const asBuilt = await getAsBuilt(db, rig.id);
    expect(asBuilt?.revision).toBe(1);
    expect(asBuilt?.document).toEqual(juniperModel);
    const mine = await listRigsForUser(db, owner.id);
    expect(mine).toEqual([expect.objectContaining({ id: rig.id, name: "Test van", role: "owner" })]);
  });

  test("saving on the head appends a revision; a stale revision number is refused and nothing is overwritten", async () => {
    const owner = await newUser();
    const { rig, branch } = await createRig(db, { name: "Revision van", ownerId: owner.id, document: juniperModel });
    const renamed = { ...juniperModel, name: "Juniper II" };
    const saved = await saveRevision(db, { rigId: branch.rigId, branchId: branch.id, expectedRevision: 1, document: renamed, authorId: owner.id });
    expect(saved.revision).toBe(2);

    const stale = { ...juniperModel, name: "Lost edit" };
    await expect(
      saveRevision(db, { rigId: branch.rigId, branchId: branch.id, expectedRevision: 1, document: stale, authorId: owner.id }),
    ).rejects.toBeInstanceOf(StaleRevisionError);

    const asBuilt = await getAsBuilt(db, rig.id);
    expect(asBuilt?.revision).toBe(2);
    expect((asBuilt?.document as { name: string }).name).toBe("Juniper II");
    const all = await db.select().from(modelRevisions).where(eq(modelRevisions.branchId, branch.id));
    expect(all.map((r) => r.revision).sort()).toEqual([1, 2]);
  });

  test("two saves racing on the same revision: exactly one wins", async () => {
    const owner = await newUser();
    const { branch } = await createRig(db, { name: "Race van", ownerId: owner.id, document: juniperModel });
    const results = await Promise.allSettled(
      [1, 2, 3].map((n) =>
        saveRevision(db, { rigId: branch.rigId, branchId: branch.id, expectedRevision: 1, document: { ...juniperModel, name: `Edit ${n}` }, authorId: owner.id }),
      ),
    );
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    expect(results.filter((r) => r.status === "rejected")).toHaveLength(2);
  });

  test("a draft starts as a copy of the as-built head and is not the as-built", async () => {
    const owner = await newUser();
    const { rig } = await createRig(db, { name: "Draft van", ownerId: owner.id, document: juniperModel });
    const draft = await createDraft(db, { rigId: rig.id, name: "More solar", authorId: owner.id });
    expect(draft.kind).toBe("draft");
    await saveRevision(db, { rigId: rig.id, branchId: draft.id, expectedRevision: 1, document: { ...juniperModel, name: "Draft" }, authorId: owner.id });
    const asBuilt = await getAsBuilt(db, rig.id);
    expect((asBuilt?.document as { name: string }).name).toBe(juniperModel.name);
  });

  test("the database refuses a second as-built branch for one rig", async () => {
    const owner = await newUser();
    const { rig } = await createRig(db, { name: "Unique van", ownerId: owner.id, document: juniperModel });
    const { modelBranches } = await import("~/db/schema");
    await expect(
      db.insert(modelBranches).values({ rigId: rig.id, kind: "as_built", name: "Second" }),
    ).rejects.toThrow();
  });
});
