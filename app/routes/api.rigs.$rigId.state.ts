import type { Route } from "./+types/api.rigs.$rigId.state";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { buildCircuitGraph } from "~/engine/circuit-graph";
import { solveState } from "~/engine/solution";
import { apiError, badRequest, issuesOf, readJson } from "~/lib/http";
import { writeRigStateAndLog } from "~/repos/logged-writes.server";
import { getAsBuiltModel, requireAsBuiltModel } from "~/repos/models.server";
import { getLatestReading, getRigState } from "~/repos/rig-state.server";
import { withSwitchHistory } from "~/repos/switch-history.server";
import { checkChangeAgainstModel, effectiveLoadsOn, stateWriteSchema } from "~/schemas/rig-state";
import { requestEvaluation } from "~/alerts/queue.server";
import { getEnv } from "~/env.server";

const noStore = { "cache-control": "private, no-store" };

/** GET /api/rigs/:rigId/state — the shared state of the rig now (any member). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const [shared, latestReading, asBuilt] = await Promise.all([getRigState(db, access.rig.id), getLatestReading(db, access.rig.id), getAsBuiltModel(db, access.rig.id)]);
  // The switches since the SoC entry (`state.history`), so the runway carries it through them.
  const state = asBuilt ? await withSwitchHistory(db, access.rig.id, asBuilt.model, shared, Date.now()) : shared;
  // Every switch's position now: recorded ones, and the rest as the engine resolves them
  // (normal position, following the loads on, or off; a changeover with none is "unknown").
  const switchPositions = asBuilt
    ? Object.values(solveState(asBuilt.model, buildCircuitGraph(asBuilt.model, state.positions), {
        modeId: state.modeId ?? asBuilt.model.modes[0]!.id,
        loadsOn: [...effectiveLoadsOn(asBuilt.model, state.modeId, state.switches)],
      }).positions)
    : [];
  return Response.json({ state, switchPositions, latestReading, role: access.role }, { headers: noStore });
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
  if (!parsed.success) return badRequest("invalid_change", "The change does not have the expected shape.", issuesOf(parsed.error));
  const { model } = await requireAsBuiltModel(db, access.rig.id);
  const issues = checkChangeAgainstModel(model, parsed.data.change);
  if (issues.length) return badRequest("invalid_change", issues[0]!.message, issues);
  // Written with its change-log entry, so phones that sync hear of it too.
  const result = await writeRigStateAndLog(db, { rigId: access.rig.id, userId: access.user.id, write: parsed.data, model, receivedAt });
  // Alerts: switches, mode or SoC changed → evaluate the rig's rules soon.
  void requestEvaluation(getEnv().DATABASE_URL, access.rig.id);
  return Response.json(result, { headers: noStore });
});
