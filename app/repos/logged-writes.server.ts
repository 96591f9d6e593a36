/**
 * Writes made through the Now screen's own API (not through POST /api/sync), each in ONE
 * transaction with its entry in the rig's change log: if the log entry cannot be written, the
 * write is rolled back too, so no phone can miss a change the server kept.
 *
 * Lock order is the sync's (app/repos/sync.server.ts): the rig's change-log lock first, then
 * the rows the write touches, so a sync and a Now-screen write of the same rig never deadlock.
 */
import type { Db } from "~/db/db.server";
import { validateModel, type RigModel } from "~/engine/model";
import { applyModeEdit, type ModeEdit } from "~/schemas/modes";
import type { StateWriteResult } from "~/schemas/rig-state";
import { requireAsBuiltModel } from "./models.server";
import { writeRigState, type WriteInput } from "./rig-state.server";
import { saveRevision, StaleRevisionError } from "./rigs.server";
import { lockRigLog, recordServerChange } from "./sync.server";

/** One shared-state change (switches, mode, SoC, place) and its change-log entry, together. */
export async function writeRigStateAndLog(db: Db, input: WriteInput & { userId: string }): Promise<StateWriteResult> {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    await lockRigLog(t, input.rigId);
    const result = await writeRigState(t, input);
    await recordServerChange(t, { rigId: input.rigId, authorId: input.userId, kind: "state.write", entityId: "state" });
    return result;
  });
}

/** A new as-built revision and its change-log entry, together. Throws StaleRevisionError. */
export async function saveAsBuiltAndLog(
  db: Db,
  input: { rigId: string; branchId: string; expectedRevision: number; document: RigModel; authorId: string; message: string },
) {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    await lockRigLog(t, input.rigId);
    const saved = await saveRevision(t, input);
    await recordServerChange(t, { rigId: input.rigId, authorId: input.authorId, kind: "model.save", entityId: input.branchId });
    return saved;
  });
}

export type ModeEditOutcome =
  | { ok: true; revision: number; modeId: string; model: RigModel }
  | { ok: false; code: "stale_revision"; message: string; revision: number | null }
  | { ok: false; code: "invalid_mode"; message: string; issues: { path: (string | number)[]; message: string }[] };

function stale(revision: number | null): ModeEditOutcome {
  return {
    ok: false,
    code: "stale_revision",
    message: `The rig was changed meanwhile (now revision ${revision ?? "unknown"}). Reload and try again.`,
    revision,
  };
}

/**
 * An owner's mode edit (a new mode, or new hours in one): applied to the as-built head named
 * by `edit.expectedRevision`, checked by the engine, saved as the next revision and logged.
 */
export async function saveModeEdit(db: Db, input: { rigId: string; authorId: string; edit: ModeEdit }): Promise<ModeEditOutcome> {
  const { edit } = input;
  const asBuilt = await requireAsBuiltModel(db, input.rigId);
  if (edit.expectedRevision !== asBuilt.revision) return stale(asBuilt.revision);
  if (edit.op === "hours" && !asBuilt.model.modes.some((m) => m.id === edit.modeId)) {
    return { ok: false, code: "invalid_mode", message: `This rig has no mode "${edit.modeId}".`, issues: [{ path: ["modeId"], message: "Unknown mode" }] };
  }
  const { model, modeId, message } = applyModeEdit(asBuilt.model, edit);
  const checked = validateModel(model);
  if (!checked.ok) return { ok: false, code: "invalid_mode", message: checked.issues[0]?.message ?? "The mode does not fit the rig.", issues: checked.issues };
  try {
    const saved = await saveAsBuiltAndLog(db, {
      rigId: input.rigId,
      branchId: asBuilt.branchId,
      expectedRevision: asBuilt.revision,
      document: checked.model,
      authorId: input.authorId,
      message,
    });
    return { ok: true, revision: saved.revision, modeId, model: checked.model };
  } catch (error) {
    if (error instanceof StaleRevisionError) return stale(error.headRevision);
    throw error;
  }
}
