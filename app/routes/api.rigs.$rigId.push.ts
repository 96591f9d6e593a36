import { z } from "zod";
import type { Route } from "./+types/api.rigs.$rigId.push";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { getEnv } from "~/env.server";
import { apiError, issuesOf, readJson } from "~/lib/http";
import { loadVapidKeys } from "~/push/vapid.server";
import { ensurePreferences, getPreferences, listSubscriptions, removeSubscription, saveSubscription } from "~/repos/alerts.server";

const noStore = { "cache-control": "private, no-store" };
const b64url = z.string().min(8).max(200).regex(/^[A-Za-z0-9_-]+=*$/, "must be base64url");

const bodySchema = z.discriminatedUnion("intent", [
  z.object({
    intent: z.literal("subscribe"),
    subscription: z.object({
      endpoint: z.url({ protocol: /^https?$/ }).max(2000),
      keys: z.object({ p256dh: b64url, auth: b64url }),
    }),
    timeZone: z.string().min(1).max(64).optional(),
    label: z.string().max(80).optional(),
  }),
  z.object({ intent: z.literal("unsubscribe"), endpoint: z.string().min(1).max(2000) }),
]);

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
  const parsed = bodySchema.safeParse(body.body);
  if (!parsed.success) return apiError(400, "invalid_subscription", "The subscription does not have the expected shape.", issuesOf(parsed.error));
  if (parsed.data.intent === "subscribe") {
    const { subscription, timeZone, label } = parsed.data;
    // Push services are HTTPS; plain HTTP only to the local fake on loopback in local runs.
    const endpoint = new URL(subscription.endpoint);
    if (endpoint.protocol !== "https:" && !(getEnv().local && ["127.0.0.1", "localhost"].includes(endpoint.hostname))) {
      return apiError(400, "invalid_subscription", "A push endpoint must be an https:// address.", [{ path: ["subscription", "endpoint"], message: "must be https" }]);
    }
    const id = await saveSubscription(db, access.user.id, {
      endpoint: subscription.endpoint,
      p256dh: subscription.keys.p256dh,
      auth: subscription.keys.auth,
      label: label ?? deviceLabel(request.headers.get("user-agent") ?? ""),
    });
    const prefs = await ensurePreferences(db, access.rig.id, access.user.id, validZone(timeZone));
    return Response.json({ ok: true, subscriptionId: id, preferences: { ...prefs, unsubscribeToken: undefined } }, { headers: noStore });
  }
  const removed = await removeSubscription(db, access.user.id, parsed.data.endpoint);
  return Response.json({ ok: true, removed }, { headers: noStore });
});

function validZone(tz: string | undefined): string {
  if (!tz) return "UTC";
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return tz;
  } catch {
    return "UTC";
  }
}

/** "Chrome on Android", "Firefox on Linux"… from a user agent, for telling one's browsers apart. */
export function deviceLabel(ua: string): string {
  const browser = /Edg\//.test(ua) ? "Edge" : /Firefox\//.test(ua) ? "Firefox" : /Chrom(e|ium)\//.test(ua) ? "Chrome" : /Safari\//.test(ua) ? "Safari" : "A browser";
  const os = /Android/.test(ua) ? "Android" : /iPhone|iPad/.test(ua) ? "iOS" : /Mac OS X/.test(ua) ? "macOS" : /Windows/.test(ua) ? "Windows" : /Linux/.test(ua) ? "Linux" : "";
  return os ? `${browser} on ${os}` : browser;
}
