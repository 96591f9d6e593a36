import type { Route } from "./+types/api.sync";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { apiError, issuesOf, readJson } from "~/lib/http";
import { MAX_SYNC_BYTES, syncRequestSchema } from "~/schemas/sync";
import { applySync } from "~/repos/sync.server";
import { requestEvaluation } from "~/alerts/queue.server";
import { getEnv } from "~/env.server";

/**
 * POST /api/sync — a phone's batch of changes for one rig. Answers per change `applied`,
 * `duplicate` or `refused` (with a reason), then the rig's changes since the phone's cursor.
 * Signed out: 401 (the phone keeps its outbox and asks the person to sign in again).
 */
export const action = protectedAction(async ({ request }: Route.ActionArgs) => {
  const receivedAt = new Date();
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "POST" });
  // The limit is counted while the body streams in (a chunked body has no Content-Length).
  const body = await readJson(request, MAX_SYNC_BYTES);
  if (!body.ok) return body.response;
  const parsed = syncRequestSchema.safeParse(body.body);
  if (!parsed.success) return apiError(400, "invalid_sync", "The sync request does not have the expected shape.", issuesOf(parsed.error));
  const db = getDb();
  const access = await requireRigRole(request, parsed.data.rigId, "guest", db);
  const answer = await applySync(db, { userId: access.user.id, role: access.role }, parsed.data, { receivedAt });
  // Alerts (issue 13): readings or state changes applied → evaluate the rig's rules soon.
  if (answer.results.some((r) => r.status === "applied")) void requestEvaluation(getEnv().DATABASE_URL, access.rig.id);
  return Response.json({ me: { userId: access.user.id, role: access.role }, ...answer }, { headers: { "cache-control": "private, no-store" } });
});

export function loader() {
  return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "POST" });
}
