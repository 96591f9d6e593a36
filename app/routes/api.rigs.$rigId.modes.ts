import type { Route } from "./+types/api.rigs.$rigId.modes";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { apiError, badRequest, conflict, issuesOf, readJson } from "~/lib/http";
import { saveModeEdit } from "~/repos/logged-writes.server";
import { modeEditSchema } from "~/schemas/modes";

/**
 * POST /api/rigs/:rigId/modes — owners save a new mode or change the hours per load in a mode.
 * Modes live in the model document: each edit is a new as-built revision. A stale
 * `expectedRevision` answers 409 with the current revision; nothing is overwritten.
 */
export const action = protectedAction(async ({ request, params }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "POST" });
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "owner", db);
  const body = await readJson(request, 64 * 1024);
  if (!body.ok) return body.response;
  const parsed = modeEditSchema.safeParse(body.body);
  if (!parsed.success) return badRequest("invalid_mode", parsed.error.issues[0]?.message ?? "The mode is not valid.", issuesOf(parsed.error));
  const outcome = await saveModeEdit(db, { rigId: access.rig.id, authorId: access.user.id, edit: parsed.data });
  if (outcome.ok) return Response.json({ revision: outcome.revision, modeId: outcome.modeId, model: outcome.model });
  if (outcome.code === "stale_revision") return conflict(outcome.code, outcome.message, { revision: outcome.revision });
  return badRequest(outcome.code, outcome.message, outcome.issues);
});

export function loader() {
  return apiError(405, "method_not_allowed", "Use POST; read the modes with GET /api/rigs/:rigId/model.", undefined, { allow: "POST" });
}
