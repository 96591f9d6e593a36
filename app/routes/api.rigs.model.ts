import type { Route } from "./+types/api.rigs.model";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { validateModel } from "~/engine/model";
import { apiError } from "~/lib/http";
import { getAsBuilt } from "~/repos/rigs.server";

/** GET /api/rigs/:rigId/model — the as-built model any member may read. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const asBuilt = await getAsBuilt(db, access.rig.id);
  const checked = asBuilt ? validateModel(asBuilt.document) : null;
  if (!asBuilt || !checked?.ok) return apiError(500, "model_unreadable", "This rig's model could not be read.");
  return Response.json(
    { rigId: access.rig.id, name: access.rig.name, revision: asBuilt.revision, model: checked.model, role: access.role },
    { headers: { "cache-control": "private, no-store" } },
  );
}
