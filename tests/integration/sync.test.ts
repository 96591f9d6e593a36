import { afterAll, describe, expect, test } from "vitest";
import { and, eq, sql } from "drizzle-orm";
import { openTestDb } from "./db";
import { modelBranches, readings, syncChanges } from "~/db/schema";
import { applySync } from "~/repos/sync.server";
import { getRigState } from "~/repos/rig-state.server";
import { getAsBuilt, saveRevision } from "~/repos/rigs.server";
import { MAX_PULL } from "~/schemas/sync";
import { addChange, change, juniperCrew, juniperReading } from "./sync-helpers";
import { juniperModel } from "../fixtures/juniper";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

const countReadings = async (rigId: string) =>
  (await db.select({ n: sql<number>`count(*)::int` }).from(readings).where(eq(readings.rigId, rigId)))[0]!.n;

describe("POST /api/sync's repository against PostgreSQL", () => {
  test("a batch of readings is applied once; the same batch sent again answers duplicate and stores nothing more", async () => {
    const { rig, ada } = await juniperCrew(db);
    const changes = Array.from({ length: 25 }, (_, i) => addChange(rig.id, juniperReading(i)));
    const first = await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: null, changes });
    expect(first.results.map((r) => r.status)).toEqual(Array(25).fill("applied"));
    const again = await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: first.cursor, changes });
    expect(again.results.map((r) => r.status)).toEqual(Array(25).fill("duplicate"));
    expect(await countReadings(rig.id)).toBe(25);
    // The sender does not get its own changes back.
    expect(first.changes).toEqual([]);
  });

  test("the same reading under a new change id, and twice inside one batch, is stored once", async () => {
    const { rig, sam } = await juniperCrew(db);
    const reading = juniperReading(0);
    const a = addChange(rig.id, reading);
    const b = addChange(rig.id, reading);
    const answer = await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor: null, changes: [a, b, a] });
    expect(answer.results.map((r) => r.status)).toEqual(["applied", "duplicate", "duplicate"]);
    expect(await countReadings(rig.id)).toBe(1);
  });

  test("batches arriving out of order are all applied, and another member pulls each reading exactly once", async () => {
    const { rig, ada, sam } = await juniperCrew(db);
    const all = Array.from({ length: 40 }, (_, i) => addChange(rig.id, juniperReading(i)));
    const later = all.slice(20);
    const earlier = all.slice(0, 20);
    for (const batch of [later, earlier]) {
      const answer = await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor: null, changes: batch });
      expect(answer.results.every((r) => r.status === "applied")).toBe(true);
    }
    const pulled = await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: null, changes: [] });
    const ids = pulled.changes.flatMap((c) => (c.kind === "reading" ? [c.reading.id] : []));
    expect(ids).toHaveLength(40);
    expect(new Set(ids)).toEqual(new Set(all.map((c) => (c.payload as { reading: { id: string } }).reading.id)));
    // Nothing new since that cursor.
    const next = await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: pulled.cursor, changes: [] });
    expect(next.changes).toEqual([]);
    expect(next.more).toBe(false);
  });

  test("a guest's write is refused as read-only and nothing is stored", async () => {
    const { rig, noor } = await juniperCrew(db);
    const answer = await applySync(db, { userId: noor.id, role: "guest" }, {
      rigId: rig.id,
      cursor: null,
      changes: [addChange(rig.id, juniperReading(0)), change(rig.id, "state.write", { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "fridge", on: false }] } })],
    });
    expect(answer.results).toEqual([
      expect.objectContaining({ status: "refused", reason: "read_only" }),
      expect.objectContaining({ status: "refused", reason: "read_only" }),
    ]);
    expect(await countReadings(rig.id)).toBe(0);
  });

  test("one bad change is refused with a clear message while the rest of the batch applies", async () => {
    const { rig, sam } = await juniperCrew(db);
    const bad = addChange(rig.id, { ...juniperReading(1), socPct: 140 });
    const empty = addChange(rig.id, { ...juniperReading(2), bankVoltageV: null, currentA: null, socPct: null, temperatureC: null, solarWhToday: null } as never);
    const answer = await applySync(db, { userId: sam.id, role: "crew" }, {
      rigId: rig.id,
      cursor: null,
      changes: [addChange(rig.id, juniperReading(0)), bad, empty, change(rig.id, "reading.fly", {}), { ...addChange(rig.id, juniperReading(3)), rigId: crypto.randomUUID() }],
    });
    expect(answer.results.map((r) => r.status)).toEqual(["applied", "refused", "refused", "refused", "refused"]);
    expect(answer.results[1]).toMatchObject({ reason: "invalid", message: "State of charge must be at most 100 %" });
    expect(answer.results[2]).toMatchObject({ reason: "invalid", message: expect.stringContaining("at least one value") });
    expect(answer.results[3]).toMatchObject({ reason: "unsupported" });
    expect(answer.results[4]).toMatchObject({ reason: "wrong_rig" });
    expect(await countReadings(rig.id)).toBe(1);
  });

  test("edits: crew may edit their own reading but not the owner's; the owner may edit anyone's; a re-sent add never overwrites an edit", async () => {
    const { rig, ada, sam } = await juniperCrew(db);
    const samReading = juniperReading(0);
    const adaReading = juniperReading(1);
    const samAdd = addChange(rig.id, samReading);
    await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor: null, changes: [samAdd] });
    await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: null, changes: [addChange(rig.id, adaReading)] });

    const crewEdits = await applySync(db, { userId: sam.id, role: "crew" }, {
      rigId: rig.id,
      cursor: null,
      changes: [
        change(rig.id, "reading.edit", { readingId: samReading.id, set: { note: "after the fridge cycled" } }),
        change(rig.id, "reading.edit", { readingId: adaReading.id, set: { note: "not mine" } }),
        change(rig.id, "reading.delete", { readingId: adaReading.id }),
      ],
    });
    expect(crewEdits.results.map((r) => (r.status === "refused" ? r.reason : r.status))).toEqual(["applied", "not_author", "not_author"]);

    const ownerEdit = await applySync(db, { userId: ada.id, role: "owner" }, {
      rigId: rig.id,
      cursor: null,
      changes: [change(rig.id, "reading.edit", { readingId: samReading.id, set: { bankVoltageV: 13.3 } })],
    });
    expect(ownerEdit.results[0]!.status).toBe("applied");

    // Sam's phone resends the original add (lost acknowledgement): the edited values stay.
    const resend = await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor: null, changes: [{ ...samAdd, id: crypto.randomUUID() }] });
    expect(resend.results[0]!.status).toBe("duplicate");
    const [row] = await db.select().from(readings).where(eq(readings.id, samReading.id));
    expect(row).toMatchObject({ note: "after the fridge cycled", bankVoltageV: expect.closeTo(13.3, 5) });
  });

  test("a delete is carried to other members by the pull, and an edit of a deleted reading is refused", async () => {
    const { rig, ada, sam } = await juniperCrew(db);
    const reading = juniperReading(0);
    const first = await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: null, changes: [addChange(rig.id, reading)] });
    const samSees = await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor: null, changes: [] });
    expect(samSees.changes).toHaveLength(1);
    await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: first.cursor, changes: [change(rig.id, "reading.delete", { readingId: reading.id })] });
    const afterDelete = await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor: samSees.cursor, changes: [] });
    expect(afterDelete.changes).toEqual([expect.objectContaining({ kind: "reading", reading: expect.objectContaining({ id: reading.id, deletedAt: expect.any(String) }) })]);
    const edit = await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: null, changes: [change(rig.id, "reading.edit", { readingId: reading.id, set: { note: "x" } })] });
    expect(edit.results[0]).toMatchObject({ status: "refused", reason: "deleted" });
  });

  test("the pull pages by cursor, honours the phone's window of days, and never repeats a change", async () => {
    const { rig, ada, sam } = await juniperCrew(db);
    const n = MAX_PULL + 150;
    const changes = Array.from({ length: n }, (_, i) => addChange(rig.id, juniperReading(i)));
    await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: null, changes: changes.slice(0, 1000) });
    await applySync(db, { userId: ada.id, role: "owner" }, { rigId: rig.id, cursor: null, changes: changes.slice(1000) });
    const seen: string[] = [];
    let cursor: number | null = null;
    let pages = 0;
    for (;;) {
      const answer = await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor, changes: [] });
      pages++;
      for (const c of answer.changes) if (c.kind === "reading") seen.push(c.reading.id);
      cursor = answer.cursor;
      if (!answer.more) break;
    }
    expect(pages).toBe(2);
    expect(seen).toHaveLength(n);
    expect(new Set(seen).size).toBe(n);

    // A phone keeping only readings from the 200th on gets only those.
    const since = juniperReading(200).takenAt;
    const windowed = await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor: null, changes: [], since });
    expect(windowed.changes.every((c) => c.kind === "reading" && c.reading.takenAt >= since)).toBe(true);
  });

  test("switch state is last-writer-wins by server time and the loser is told", async () => {
    const { rig, ada, sam } = await juniperCrew(db);
    const t0 = new Date();
    const later = await applySync(
      db,
      { userId: ada.id, role: "owner" },
      { rigId: rig.id, cursor: null, changes: [change(rig.id, "state.write", { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "fridge", on: false }] } })] },
      { receivedAt: new Date(t0.getTime() + 1000) },
    );
    expect(later.results[0]).toMatchObject({ status: "applied", detail: { superseded: false } });
    // Sam's change reaches the server with an earlier server time (a slow request): it loses.
    const earlier = await applySync(
      db,
      { userId: sam.id, role: "crew" },
      { rigId: rig.id, cursor: null, changes: [change(rig.id, "state.write", { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "fridge", on: true }] } })] },
      { receivedAt: t0 },
    );
    expect(earlier.results[0]).toMatchObject({ status: "applied", detail: { superseded: true, lostFields: [expect.objectContaining({ field: "load:fridge", by: ada.id })] } });
    expect((await getRigState(db, rig.id)).switches.fridge).toBe(false);
    // Sam's phone hears that the state moved.
    expect(earlier.changes).toEqual([expect.objectContaining({ kind: "state" })]);
  });

  test("model edits made offline: refused for crew, and for an owner a draft when the as-built moved meanwhile", async () => {
    const { rig, branch, ada, sam } = await juniperCrew(db);
    const edited = { ...juniperModel, name: "Juniper (new fridge)" };
    const crew = await applySync(db, { userId: sam.id, role: "crew" }, {
      rigId: rig.id,
      cursor: null,
      changes: [change(rig.id, "model.save", { branchId: branch.id, baseRevision: 1, document: edited })],
    });
    expect(crew.results[0]).toMatchObject({ status: "refused", reason: "owners_only" });

    // Meanwhile the as-built moved to revision 2 (from another device).
    await saveRevision(db, { rigId: branch.rigId, branchId: branch.id, expectedRevision: 1, document: { ...juniperModel, name: "Juniper (roof fan)" }, authorId: ada.id });
    const owner = await applySync(db, { userId: ada.id, role: "owner" }, {
      rigId: rig.id,
      cursor: null,
      changes: [change(rig.id, "model.save", { branchId: branch.id, baseRevision: 1, document: edited })],
    });
    expect(owner.results[0]).toMatchObject({ status: "applied", detail: { becameDraft: true } });
    const asBuilt = await getAsBuilt(db, rig.id);
    expect((asBuilt?.document as { name: string }).name).toBe("Juniper (roof fan)");
    const drafts = await db.select().from(modelBranches).where(and(eq(modelBranches.rigId, rig.id), eq(modelBranches.kind, "draft")));
    expect(drafts).toHaveLength(1);

    // On the head it is a plain save.
    const onHead = await applySync(db, { userId: ada.id, role: "owner" }, {
      rigId: rig.id,
      cursor: null,
      changes: [change(rig.id, "model.save", { branchId: branch.id, baseRevision: 2, document: edited })],
    });
    expect(onHead.results[0]).toMatchObject({ status: "applied", detail: { revision: 3 } });
  });

  test("an offline save that names no branch lands on the rig's as-built model", async () => {
    const { rig, branch, ada } = await juniperCrew(db);
    const edited = { ...juniperModel, name: "Juniper (phone edit)" };
    const answer = await applySync(db, { userId: ada.id, role: "owner" }, {
      rigId: rig.id,
      cursor: null,
      changes: [change(rig.id, "model.save", { baseRevision: 1, document: edited })],
    });
    expect(answer.results[0]).toMatchObject({ status: "applied", detail: { branchId: branch.id, revision: 2 } });
    expect(((await getAsBuilt(db, rig.id))?.document as { name: string }).name).toBe("Juniper (phone edit)");
  });

  test("10,000 readings in batches of 1,000 are all stored once, with one change-log row each", async () => {
    const { rig, sam } = await juniperCrew(db);
    const all = Array.from({ length: 10_000 }, (_, i) => addChange(rig.id, juniperReading(i)));
    const started = performance.now();
    for (let i = 0; i < all.length; i += 1000) {
      const answer = await applySync(db, { userId: sam.id, role: "crew" }, { rigId: rig.id, cursor: null, changes: all.slice(i, i + 1000) });
      expect(answer.results.filter((r) => r.status === "applied")).toHaveLength(1000);
    }
    const ms = performance.now() - started;
    console.log(`[sync] 10,000 readings ingested in ${ms.toFixed(0)} ms (${Math.round(10_000 / (ms / 1000))} readings/s)`);
    expect(await countReadings(rig.id)).toBe(10_000);
    const [log] = await db.select({ n: sql<number>`count(*)::int` }).from(syncChanges).where(eq(syncChanges.rigId, rig.id));
    expect(log!.n).toBe(10_000);
  });
});
