import type { Route } from "./+types/api.rigs.modes";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { validateModel } from "~/engine/model";
import { apiError, issuesOf, readJson } from "~/lib/http";
import { getAsBuilt, saveRevision, StaleRevisionError } from "~/repos/rigs.server";
import { applyModeEdit, modeEditSchema } from "~/schemas/modes";
import { recordServerChange } from "~/repos/sync.server";

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
  if (!parsed.success) return apiError(400, "invalid_mode", parsed.error.issues[0]?.message ?? "The mode is not valid.", issuesOf(parsed.error));
  const asBuilt = await getAsBuilt(db, access.rig.id);
  const current = asBuilt ? validateModel(asBuilt.document) : null;
  if (!asBuilt || !current?.ok) return apiError(500, "model_unreadable", "This rig's model could not be read.");
  if (parsed.data.expectedRevision !== asBuilt.revision) {
    return Response.json(
      { error: { code: "stale_revision", message: `The rig was changed meanwhile (now revision ${asBuilt.revision}). Reload and try again.` }, revision: asBuilt.revision },
      { status: 409 },
    );
  }
  const edit = parsed.data;
  if (edit.op === "hours" && !current.model.modes.some((m) => m.id === edit.modeId)) {
    return apiError(400, "invalid_mode", `This rig has no mode "${edit.modeId}".`, [{ path: ["modeId"], message: "Unknown mode" }]);
  }
  const { model, modeId, message } = applyModeEdit(current.model, edit);
  const checked = validateModel(model);
  if (!checked.ok) return apiError(400, "invalid_mode", checked.issues[0]?.message ?? "The mode does not fit the rig.", checked.issues);
  try {
    const saved = await saveRevision(db, { rigId: access.rig.id, branchId: asBuilt.branchId, expectedRevision: asBuilt.revision, document: checked.model, authorId: access.user.id, message });
    await recordServerChange(db, { rigId: access.rig.id, authorId: access.user.id, kind: "model.save", entityId: asBuilt.branchId });
    return Response.json({ revision: saved.revision, modeId, model: checked.model });
  } catch (error) {
    if (error instanceof StaleRevisionError) {
      return Response.json(
        { error: { code: "stale_revision", message: `The rig was changed meanwhile (now revision ${error.headRevision}). Reload and try again.` }, revision: error.headRevision },
        { status: 409 },
      );
    }
    throw error;
  }
});

export function loader() {
  return apiError(405, "method_not_allowed", "Use POST; read the modes with GET /api/rigs/:rigId/model.", undefined, { allow: "POST" });
}
