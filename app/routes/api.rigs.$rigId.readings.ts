import type { Route } from "./+types/api.rigs.$rigId.readings";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { apiError, badRequest, issuesOf } from "~/lib/http";
import { readingsQuerySchema } from "~/schemas/readings";
import { listReadings, readingSeries, toWire } from "~/repos/readings.server";

const DAY_MS = 86_400_000;

/**
 * GET /api/rigs/:rigId/readings — the logbook for any member.
 * `?view=series&from&to&points=600` answers at most `points` chart points;
 * `?view=list&limit&beforeAt&beforeId` pages newest first.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const parsed = readingsQuerySchema.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!parsed.success) return badRequest("invalid_query", "The query is not valid.", issuesOf(parsed.error));
  const q = parsed.data;
  const headers = { "cache-control": "private, no-store" };
  if (q.view === "series") {
    const to = q.to ? new Date(q.to) : new Date();
    const from = q.from ? new Date(q.from) : new Date(to.getTime() - 7 * DAY_MS);
    if (from >= to) return badRequest("invalid_range", "The start of the range must be before its end.");
    const series = await readingSeries(db, access.rig.id, { from, to }, q.points);
    return Response.json({ from: from.toISOString(), to: to.toISOString(), ...series }, { headers });
  }
  const before = q.beforeAt && q.beforeId ? { takenAt: new Date(q.beforeAt), id: q.beforeId } : undefined;
  const rows = await listReadings(db, access.rig.id, {
    from: q.from ? new Date(q.from) : undefined,
    to: q.to ? new Date(q.to) : undefined,
    limit: q.limit,
    before,
  });
  return Response.json({ readings: rows.map(toWire) }, { headers });
}

/** Readings are written through /api/sync; every other method here is refused as JSON. */
export function action() {
  return apiError(405, "method_not_allowed", "Read the logbook with GET; readings are added through POST /api/sync.", undefined, { allow: "GET" });
}
