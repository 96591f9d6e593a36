/**
 * The Now screen offline: keep what the server last said (model, shared state, latest reading)
 * in the local store, hand it back when there is no network, and queue switch changes made
 * offline in the outbox (sent by the sync runner; last writer by server time wins).
 */
import { validateModel, type RigModel } from "~/engine/model";
import { applyModeEdit, modeEditSchema } from "~/schemas/modes";
import type { ChangePayload } from "./protocol";
import { applyChange, type LatestReading, type RigState, type StateWrite } from "~/schemas/rig-state";
import { localDb, type Role } from "./db.client";
import { enqueue } from "./outbox.client";
import { readRigLocal, saveRigModel, saveRigState } from "./rig-data.client";
import { readingsInRange } from "./readings-store.client";

export type NowPayload = {
  model: { rigId: string; name: string; revision: number; model: RigModel; role: Role };
  shared: { state: RigState; latestReading: LatestReading | null; role: Role };
  nowMs: number;
};

/** Keeps the Now screen's server data for offline use (errors are ignored: a cache). */
export async function keepNowOffline(payload: Omit<NowPayload, "nowMs">) {
  try {
    await saveRigModel(payload.model);
    await saveRigState(payload.model.rigId, payload.shared.state, { latestReading: payload.shared.latestReading });
  } catch {
    /* private mode or storage full: the screen still works online */
  }
}

/** The Now screen's data from the phone, or null when this rig was never opened here. */
export async function readNowLocal(rigId: string): Promise<NowPayload | null> {
  const snap = await readRigLocal(rigId);
  if (!snap?.model) return null;
  const local = await localDb().states.get(rigId);
  const role = snap.rig.role ?? "guest";
  const latestFromLog = (await readingsInRange(localDb(), rigId, Date.now() - 7 * 86_400_000)).find((r) => r.socPct !== null || r.bankVoltageV !== null);
  const kept = (local?.extra?.latestReading as LatestReading | null | undefined) ?? null;
  const latestReading: LatestReading | null =
    latestFromLog && (!kept || latestFromLog.takenAt > Date.parse(kept.takenAt))
      ? { id: latestFromLog.id, takenAt: new Date(latestFromLog.takenAt).toISOString(), socPct: latestFromLog.socPct, bankVoltageV: latestFromLog.bankVoltageV, currentA: latestFromLog.currentA }
      : kept;
  const state: RigState = local?.state ?? {
    rigId, version: 0, modeId: null, switches: {}, positions: {}, soc: null, place: { kind: "home" }, weather: { kind: "clear" }, fieldTimes: {}, updatedAt: null,
  };
  return {
    model: { rigId, name: snap.rig.name, revision: snap.model.revision, model: snap.model.model, role },
    shared: { state, latestReading, role },
    nowMs: Date.now(),
  };
}

/** A Now-screen change made with no connection: applied on the phone, queued for the server. */
export async function queueStateWrite(rigId: string, write: StateWrite) {
  const db = localDb();
  await db.transaction("rw", db.states, db.outbox, async () => {
    const local = await db.states.get(rigId);
    if (local) await db.states.update(rigId, { state: applyChange(local.state, write.change) });
  });
  await enqueue(db, rigId, "state.write", write, "state");
}

/**
 * An owner's mode edit made with no connection: applied to the phone's model and queued as a
 * save of the as-built model. Several edits before the connection returns travel as one save
 * built on the revision the phone had, so they cannot turn each other into drafts. If the
 * as-built moved meanwhile, the server keeps the edit as a draft (see DEVELOPERS.md).
 */
export async function queueModeEdit(current: NowPayload["model"], body: unknown): Promise<{ revision: number; modeId: string; model: RigModel }> {
  const parsed = modeEditSchema.safeParse(body);
  if (!parsed.success) throw new Error(parsed.error.issues[0]?.message ?? "The mode is not valid.");
  const { model, modeId, message } = applyModeEdit(current.model, parsed.data);
  const checked = validateModel(model);
  if (!checked.ok) throw new Error(checked.issues[0]?.message ?? "The mode does not fit the rig.");
  const db = localDb();
  await saveRigModel({ rigId: current.rigId, name: current.name, role: current.role, revision: current.revision, model: checked.model });
  const waiting = await db.outbox
    .where("[rigId+state]")
    .equals([current.rigId, "waiting"])
    .filter((e) => e.kind === "model.save")
    .first();
  if (waiting) {
    const payload = waiting.payload as ChangePayload<"model.save">;
    await db.outbox.update(waiting.seq!, { payload: { ...payload, document: checked.model, message: `${payload.message ?? "Saved offline"}; ${message}`.slice(0, 200) } });
  } else {
    await enqueue(db, current.rigId, "model.save", { baseRevision: current.revision, document: checked.model, message }, "model");
  }
  return { revision: current.revision, modeId, model: checked.model };
}
