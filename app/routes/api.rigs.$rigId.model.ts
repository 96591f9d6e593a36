import type { Route } from "./+types/api.rigs.$rigId.model";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { requireAsBuiltModel } from "~/repos/models.server";

/** GET /api/rigs/:rigId/model — the as-built model any member may read. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const asBuilt = await requireAsBuiltModel(db, access.rig.id);
  return Response.json(
    { rigId: access.rig.id, name: access.rig.name, revision: asBuilt.revision, model: asBuilt.model, role: access.role },
    { headers: { "cache-control": "private, no-store" } },
  );
}
