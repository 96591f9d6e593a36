/**
 * A rig's data on the phone: read the local store first; fetch from the server when the store
 * has nothing yet or when asked to refresh, and keep what the server says for offline use.
 */
import type { RigModel } from "~/engine/model";
import type { RigState } from "~/schemas/rig-state";
import { getMeta, localDb, setMeta, type LocalModel, type LocalRig, type Role } from "./db.client";
import { syncRunner } from "./sync.client";

export type RigSnapshot = { rig: LocalRig; model: LocalModel | null };
export type FetchOutcome = "ok" | "offline" | "signed-out" | "not-found" | "error";

export async function readRigLocal(rigId: string): Promise<RigSnapshot | null> {
  const db = localDb();
  const rig = await db.rigs.get(rigId);
  if (!rig) return null;
  const models = await db.models.where("rigId").equals(rigId).sortBy("revision");
  return { rig, model: models.at(-1) ?? null };
}

async function getJson(url: string): Promise<{ outcome: FetchOutcome; body?: unknown }> {
  if (typeof navigator !== "undefined" && !navigator.onLine) return { outcome: "offline" };
  try {
    const res = await fetch(url, { headers: { accept: "application/json" }, credentials: "same-origin" });
    if (res.status === 401) return { outcome: "signed-out" };
    if (res.status === 404 || res.status === 403) return { outcome: "not-found" };
    if (!res.ok) return { outcome: "error" };
    return { outcome: "ok", body: await res.json() };
  } catch {
    return { outcome: "offline" };
  }
}

/** Keeps a model payload from GET /api/rigs/:rigId/model (or a server loader) on the phone. */
export async function saveRigModel(input: { rigId: string; name: string; role: Role | null; revision: number; model: RigModel; userId?: string | null }) {
  const db = localDb();
  const userId = input.userId ?? (await getMeta<string | null>(db, "userId", null));
  const isNew = !(await db.rigs.get(input.rigId));
  await db.transaction("rw", db.rigs, db.models, db.modes, async () => {
    await db.rigs.put({ id: input.rigId, name: input.name, role: input.role, userId, seenAt: Date.now() });
    await db.models.put({ rigId: input.rigId, revision: input.revision, name: input.name, model: input.model, savedAt: Date.now() });
    // Only the latest few revisions are kept.
    const old = await db.models.where("rigId").equals(input.rigId).sortBy("revision");
    for (const m of old.slice(0, Math.max(0, old.length - 3))) await db.models.delete([m.rigId, m.revision]);
    await db.modes.where("rigId").equals(input.rigId).delete();
    await db.modes.bulkPut(input.model.modes.map((m, order) => ({ rigId: input.rigId, id: m.id, name: m.name, order })));
  });
  // A rig new to this phone: fetch its logbook now rather than at the next periodic sync.
  if (isNew) void syncRunner().syncNow("rig-added");
}

export async function saveRigState(rigId: string, state: RigState, extra?: Record<string, unknown>) {
  await localDb().states.put({ rigId, state, fetchedAt: Date.now(), ...(extra ? { extra } : {}) });
}

/** Asks the server for the rig's model (and who this person is) and keeps both. */
export async function fetchRig(rigId: string): Promise<FetchOutcome> {
  const db = localDb();
  if (!(await getMeta<string | null>(db, "userId", null))) {
    const me = await getJson("/api/v1/me");
    if (me.outcome === "ok") await setMeta(db, "userId", (me.body as { user: { id: string } }).user.id);
    else if (me.outcome !== "offline") return me.outcome;
  }
  const res = await getJson(`/api/rigs/${rigId}/model`);
  if (res.outcome !== "ok") return res.outcome;
  const body = res.body as { rigId: string; name: string; revision: number; model: RigModel; role: Role };
  await saveRigModel(body);
  const state = await getJson(`/api/rigs/${rigId}/state`);
  if (state.outcome === "ok") {
    const s = state.body as { state: RigState } & Record<string, unknown>;
    await saveRigState(rigId, s.state, s);
  }
  return "ok";
}
