import type { Route } from "./+types/api.rigs.$rigId.push";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { apiError, issuesOf, readJson } from "~/lib/http";
import { loadVapidKeys } from "~/push/vapid.server";
import { getPreferences, listSubscriptions, removeSubscription } from "~/repos/alerts.server";
import { pushBodySchema, subscribeBrowser } from "./api.rigs.$rigId.push.server";

const noStore = { "cache-control": "private, no-store" };

/** GET /api/rigs/:rigId/push — the VAPID public key, this person's "Warn me" and their browsers (any member). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const [prefs, subs] = await Promise.all([getPreferences(db, access.rig.id, access.user.id), listSubscriptions(db, access.user.id)]);
  return Response.json(
    { publicKey: loadVapidKeys().publicKey, warned: prefs !== null, subscriptions: subs.map((s) => ({ id: s.id, endpoint: s.endpoint, label: s.label })) },
    { headers: noStore },
  );
}

/**
 * POST /api/rigs/:rigId/push — `subscribe` saves this browser's push subscription for the
 * signed-in person and turns on "Warn me" for the rig (guests included); `unsubscribe`
 * removes this browser's subscription.
 */
export const action = protectedAction(async ({ request, params }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "GET, POST" });
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  const body = await readJson(request, 64 * 1024);
  if (!body.ok) return body.response;
  const parsed = pushBodySchema.safeParse(body.body);
  if (!parsed.success) return apiError(400, "invalid_subscription", "The subscription does not have the expected shape.", issuesOf(parsed.error));
  if (parsed.data.intent === "subscribe") {
    const done = await subscribeBrowser(db, access.user.id, access.rig.id, parsed.data, request.headers.get("user-agent") ?? "");
    if (!done.ok) {
      return apiError(400, "invalid_subscription", "A push endpoint must be an https:// address.", [{ path: ["subscription", "endpoint"], message: "must be https" }]);
    }
    return Response.json({ ok: true, subscriptionId: done.id, preferences: { ...done.prefs, unsubscribeToken: undefined } }, { headers: noStore });
  }
  const removed = await removeSubscription(db, access.user.id, parsed.data.endpoint);
  return Response.json({ ok: true, removed }, { headers: noStore });
});
