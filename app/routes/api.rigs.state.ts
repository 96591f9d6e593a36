import type { Route } from "./+types/api.rigs.state";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { validateModel } from "~/engine/model";
import { apiError, issuesOf, readJson } from "~/lib/http";
import { getLatestReading, getRigState, writeRigState } from "~/repos/rig-state.server";
import { recordServerChange } from "~/repos/sync.server";
import { getAsBuilt } from "~/repos/rigs.server";
import { checkChangeAgainstModel, stateWriteSchema } from "~/schemas/rig-state";

const noStore = { "cache-control": "private, no-store" };

/** GET /api/rigs/:rigId/state — the shared state of the rig now (any member). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const [state, latestReading] = await Promise.all([getRigState(db, access.rig.id), getLatestReading(db, access.rig.id)]);
  return Response.json({ state, latestReading, role: access.role }, { headers: noStore });
}

/**
 * POST /api/rigs/:rigId/state — one change (switch loads, choose a mode, enter the SoC, set
 * place or weather). Crew and owners; guests get 403. Always 200 for a well-formed change:
 * `superseded: true` says a later write (by server time) had already changed some field.
 */
export const action = protectedAction(async ({ request, params }: Route.ActionArgs) => {
  const receivedAt = new Date();
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "GET, POST" });
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "crew", db);
  const body = await readJson(request, 64 * 1024);
  if (!body.ok) return body.response;
  const parsed = stateWriteSchema.safeParse(body.body);
  if (!parsed.success) return apiError(400, "invalid_change", "The change does not have the expected shape.", issuesOf(parsed.error));
  const asBuilt = await getAsBuilt(db, access.rig.id);
  const checked = asBuilt ? validateModel(asBuilt.document) : null;
  if (!checked?.ok) return apiError(500, "model_unreadable", "This rig's model could not be read.");
  const issues = checkChangeAgainstModel(checked.model, parsed.data.change);
  if (issues.length) return apiError(400, "invalid_change", issues[0]!.message, issues);
  const result = await writeRigState(db, { rigId: access.rig.id, userId: access.user.id, write: parsed.data, model: checked.model, receivedAt });
  // Phones that sync hear of it too (the Now screen's own refetch covers the open screens).
  await recordServerChange(db, { rigId: access.rig.id, authorId: access.user.id, kind: "state.write", entityId: "state" });
  return Response.json(result, { headers: noStore });
});
