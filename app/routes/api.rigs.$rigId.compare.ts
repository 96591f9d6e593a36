import { z } from "zod";
import type { Route } from "./+types/api.rigs.$rigId.compare";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { compareStates } from "~/engine/compare";
import { validateModel } from "~/engine/model";
import { apiError, issuesOf, readJson } from "~/lib/http";
import { getAsBuilt } from "~/repos/rigs.server";

const positions = z.record(z.string().min(1).max(100), z.string().min(1).max(40));
const sideSchema = z.object({
  /** A draft model document (from the editor); absent = the rig as built. */
  model: z.unknown().optional(),
  /** Switch positions for this side (others resolve as the engine does). */
  positions: positions.optional(),
  label: z.string().min(1).max(60).optional(),
});
export const compareRequestSchema = z.object({
  a: sideSchema.default({}),
  b: sideSchema,
  /** The instant to project from (default: the server's now). */
  dateTime: z.iso.datetime({ offset: true }).optional(),
  banks: z.array(z.object({ bankId: z.string().min(1).max(100), socPct: z.number().finite().min(0).max(100) })).max(8).optional(),
  horizonH: z.number().int().min(6).max(168).optional(),
});

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
  const asBuilt = await getAsBuilt(db, access.rig.id);
  const current = asBuilt ? validateModel(asBuilt.document) : null;
  if (!asBuilt || !current?.ok) return apiError(500, "model_unreadable", "This rig's model could not be read.");
  const sides = [];
  for (const [key, s] of [["a", parsed.data.a], ["b", parsed.data.b]] as const) {
    let model = current.model;
    if (s.model !== undefined) {
      const v = validateModel(s.model);
      if (!v.ok) return apiError(400, "invalid_model", `Side ${key}: the draft is not a valid rig model.`, v.issues.map((i) => ({ ...i, path: [key, "model", ...i.path] })));
      model = v.model;
    }
    const bad = Object.entries(s.positions ?? {}).find(([id, pos]) => !model.switches.some((sw) => sw.id === id && sw.positions.includes(pos)));
    if (bad) return apiError(400, "invalid_position", `Side ${key}: no switch "${bad[0]}" with a position "${bad[1]}".`, [{ path: [key, "positions", bad[0]], message: "Unknown switch or position" }]);
    sides.push({ model, ...(s.positions ? { switchPositions: s.positions } : {}), label: s.label ?? (s.model !== undefined ? "draft" : "as built") });
  }
  const banks = parsed.data.banks ?? current.model.banks.map((b) => ({ bankId: b.id, socPct: 100 }));
  const comparison = compareStates(sides[0]!, sides[1]!, { dateTime: parsed.data.dateTime ?? new Date().toISOString(), banks }, { horizonH: parsed.data.horizonH ?? 72 });
  return Response.json({ rigId: access.rig.id, revision: asBuilt.revision, socAssumedFull: !parsed.data.banks, comparison }, { headers: { "cache-control": "private, no-store" } });
});

export function loader() {
  return apiError(405, "method_not_allowed", "Use POST with a JSON body.", undefined, { allow: "POST" });
}
