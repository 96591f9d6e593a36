import type { Route } from "./+types/api.rigs.$rigId.compare";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { compareStates } from "~/engine/compare";
import { apiError, issuesOf, readJson } from "~/lib/http";
import { getAsBuiltModel, MODEL_UNREADABLE } from "~/repos/models.server";
import { compareRequestSchema, compareSides } from "./api.rigs.$rigId.compare.server";

/**
 * POST /api/rigs/:rigId/compare — two states of the rig side by side: as built against a draft,
 * or as built in two sets of switch positions. Any member may ask (nothing is written).
 */
export const action = protectedAction(async ({ request, params }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "POST" });
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const body = await readJson(request);
  if (!body.ok) return body.response;
  const parsed = compareRequestSchema.safeParse(body.body);
  if (!parsed.success) return apiError(400, "invalid_request", parsed.error.issues[0]?.message ?? "The comparison request is not valid.", issuesOf(parsed.error));
  const current = await getAsBuiltModel(db, access.rig.id);
  if (!current) return apiError(500, "model_unreadable", MODEL_UNREADABLE);
  const picked = compareSides(current.model, parsed.data);
  if (!picked.ok) return apiError(400, picked.code, picked.message, picked.issues);
  const { sides } = picked;
  const banks = parsed.data.banks ?? current.model.banks.map((b) => ({ bankId: b.id, socPct: 100 }));
  const comparison = compareStates(sides[0]!, sides[1]!, { dateTime: parsed.data.dateTime ?? new Date().toISOString(), banks }, { horizonH: parsed.data.horizonH ?? 72 });
  return Response.json({ rigId: access.rig.id, revision: current.revision, socAssumedFull: !parsed.data.banks, comparison }, { headers: { "cache-control": "private, no-store" } });
});

export function loader() {
  return apiError(405, "method_not_allowed", "Use POST with a JSON body.", undefined, { allow: "POST" });
}
