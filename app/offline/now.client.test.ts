import "fake-indexeddb/auto";
import { describe, expect, test } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { localDb } from "./db.client";
import { queueModeEdit } from "./now.client";
import type { ChangePayload } from "./protocol";

const RIG = "6a0c2f9e-1b2d-4c3e-8f4a-5b6c7d8e9f01";

describe("Mode edits made offline", () => {
  test("two edits before the connection returns travel as one as-built save on the revision the phone had", async () => {
    const current = { rigId: RIG, name: juniperModel.name, revision: 4, model: juniperModel, role: "owner" as const };
    const fridge = juniperModel.loads.find((l) => /fridge/i.test(l.name))!;
    const first = await queueModeEdit(current, { op: "create", expectedRevision: 4, name: "Cold night", loads: [{ loadId: fridge.id, hoursPerDay: 24 }] });
    expect(first.revision).toBe(4);
    expect(first.model.modes.map((m) => m.name)).toContain("Cold night");

    const second = await queueModeEdit(
      { ...current, model: first.model },
      { op: "hours", expectedRevision: 4, modeId: first.modeId, loads: [{ loadId: fridge.id, hoursPerDay: 12 }] },
    );

    const waiting = await localDb().outbox.where("[rigId+state]").equals([RIG, "waiting"]).toArray();
    expect(waiting).toHaveLength(1);
    expect(waiting[0]!.kind).toBe("model.save");
    const payload = waiting[0]!.payload as ChangePayload<"model.save">;
    expect(payload.baseRevision).toBe(4);
    expect(payload.branchId).toBeUndefined();
    const saved = payload.document as typeof juniperModel;
    expect(saved.modes.find((m) => m.id === second.modeId)?.loads).toEqual([{ loadId: fridge.id, hoursPerDay: 12 }]);

    // The phone's own copy shows the edit at once.
    const kept = await localDb().models.where("rigId").equals(RIG).last();
    expect(kept?.model.modes.some((m) => m.name === "Cold night")).toBe(true);
  });

  test("an edit that does not fit the rig is refused on the phone with a message, and nothing is queued", async () => {
    const rig = "7b1d3a0f-2c3e-4d5f-9a6b-7c8d9e0f1a22";
    const current = { rigId: rig, name: juniperModel.name, revision: 1, model: juniperModel, role: "owner" as const };
    await expect(queueModeEdit(current, { op: "hours", expectedRevision: 1, modeId: "no-such-mode", loads: [{ loadId: "nope", hoursPerDay: 30 }] })).rejects.toThrow(
      /Hours per day are between 0 and 24/,
    );
    expect(await localDb().outbox.where("[rigId+state]").equals([rig, "waiting"]).count()).toBe(0);
  });
});
