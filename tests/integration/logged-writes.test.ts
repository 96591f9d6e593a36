// A Now-screen write and its change-log entry are one transaction (real PostgreSQL): when the
// change-log insert fails, the write is rolled back too. The failure is a trigger that refuses
// change-log rows of one test rig only, so other tests running at once are not touched.
import { afterAll, describe, expect, test } from "vitest";
import { eq, sql } from "drizzle-orm";
import { openTestDb, testDatabaseUrl } from "./db";

process.env.DATABASE_URL ??= testDatabaseUrl;

const { db, pool } = openTestDb();
afterAll(() => pool.end());

const { modelRevisions, rigState, switchChanges, syncChanges, users } = await import("~/db/schema");
const { createRig, getAsBuilt } = await import("~/repos/rigs.server");
const { getAsBuiltModel, requireAsBuiltModel } = await import("~/repos/models.server");
const { saveModeEdit, writeRigStateAndLog } = await import("~/repos/logged-writes.server");
const { juniperModel } = await import("../fixtures/juniper");
const { demoPeopleTagged } = await import("../fixtures/demo");

async function rigOwnedByAda() {
  const tag = crypto.randomUUID().slice(0, 8);
  const ada = demoPeopleTagged(tag).find((p) => p.role === "owner")!;
  const [owner] = await db.insert(users).values({ email: ada.email, name: ada.name }).returning();
  const { rig } = await createRig(db, { name: `Juniper ${tag}`, ownerId: owner!.id, document: juniperModel });
  return { rig, owner: owner! };
}

/** Makes every change-log insert for this rig fail until the returned function is called. */
async function breakChangeLogOf(rigId: string) {
  const name = `refuse_log_${rigId.replaceAll("-", "_")}`;
  await db.execute(sql.raw(`create function ${name}() returns trigger language plpgsql as $$ begin raise exception 'change log refused for this test'; end $$`));
  await db.execute(sql.raw(`create trigger ${name} before insert on sync_changes for each row when (new.rig_id = '${rigId}') execute function ${name}()`));
  return async () => {
    await db.execute(sql.raw(`drop trigger ${name} on sync_changes`));
    await db.execute(sql.raw(`drop function ${name}()`));
  };
}

const logRows = (rigId: string) => db.select().from(syncChanges).where(eq(syncChanges.rigId, rigId));

describe("A Now-screen write and its change-log entry", () => {
  test("a switch whose change-log entry fails is not kept: no state, no switch history, no log row", async () => {
    const { rig, owner } = await rigOwnedByAda();
    const write = { baseVersion: 0, change: { kind: "switch" as const, loads: [{ loadId: "fridge", on: false }] } };
    const repair = await breakChangeLogOf(rig.id);
    try {
      await expect(writeRigStateAndLog(db, { rigId: rig.id, userId: owner.id, write, model: juniperModel })).rejects.toThrow();
    } finally {
      await repair();
    }
    expect(await db.select().from(rigState).where(eq(rigState.rigId, rig.id))).toEqual([]);
    expect(await db.select().from(switchChanges).where(eq(switchChanges.rigId, rig.id))).toEqual([]);
    expect(await logRows(rig.id)).toEqual([]);

    // With the log working again the same write is kept, with exactly one log row.
    const result = await writeRigStateAndLog(db, { rigId: rig.id, userId: owner.id, write, model: juniperModel });
    expect(result.state.switches).toEqual({ fridge: false });
    expect(await logRows(rig.id)).toEqual([expect.objectContaining({ kind: "state.write", entityId: "state" })]);
  });

  test("a mode edit whose change-log entry fails leaves the as-built model at its old revision", async () => {
    const { rig, owner } = await rigOwnedByAda();
    const edit = { op: "create" as const, expectedRevision: 1, name: "Quiet evening", loads: [{ loadId: "lights", hoursPerDay: 2 }], inverterIdsOn: [] };
    const repair = await breakChangeLogOf(rig.id);
    try {
      await expect(saveModeEdit(db, { rigId: rig.id, authorId: owner.id, edit })).rejects.toThrow();
    } finally {
      await repair();
    }
    const asBuilt = await getAsBuilt(db, rig.id);
    expect(asBuilt?.revision).toBe(1);
    expect((asBuilt?.document as typeof juniperModel).modes.map((m) => m.name)).not.toContain("Quiet evening");
    expect(await logRows(rig.id)).toEqual([]);

    const saved = await saveModeEdit(db, { rigId: rig.id, authorId: owner.id, edit });
    expect(saved).toMatchObject({ ok: true, revision: 2, modeId: "quiet-evening" });
    expect(await logRows(rig.id)).toEqual([expect.objectContaining({ kind: "model.save", entityId: asBuilt!.branchId })]);
  });
});

describe("Reading the as-built model", () => {
  test("a stored document the engine refuses answers 500 model_unreadable, never a half-read model", async () => {
    const { rig } = await rigOwnedByAda();
    expect((await requireAsBuiltModel(db, rig.id)).model.name).toBe(juniperModel.name);
    const asBuilt = await getAsBuilt(db, rig.id);
    await db.update(modelRevisions).set({ document: { ...juniperModel, banks: "not a list" } }).where(eq(modelRevisions.branchId, asBuilt!.branchId));

    expect(await getAsBuiltModel(db, rig.id)).toBeNull();
    const thrown = await requireAsBuiltModel(db, rig.id).catch((e: unknown) => e);
    expect(thrown).toBeInstanceOf(Response);
    expect((thrown as Response).status).toBe(500);
    expect(await (thrown as Response).json()).toEqual({ error: { code: "model_unreadable", message: "This rig's model could not be read." } });
  });

  test("a rig id with no model at all answers the same 500, not a crash", async () => {
    const thrown = await requireAsBuiltModel(db, crypto.randomUUID()).catch((e: unknown) => e);
    expect((thrown as Response).status).toBe(500);
  });
});
