/**
 * The push route's logic (app/routes/api.rigs.$rigId.push.ts): the subscription body's shape,
 * and subscribing a browser for a person on a rig (which turns on their "Warn me").
 */
import { z } from "zod";
import type { Db } from "~/db/db.server";
import { getEnv } from "~/env.server";
import { ensurePreferences, saveSubscription } from "~/repos/alerts.server";

const b64url = z.string().min(8).max(200).regex(/^[A-Za-z0-9_-]+=*$/, "must be base64url");

export const pushBodySchema = z.discriminatedUnion("intent", [
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

type Subscribe = Extract<z.infer<typeof pushBodySchema>, { intent: "subscribe" }>;

/**
 * Saves the browser's subscription and ensures the person's alert choices for the rig. Refuses a
 * plain-HTTP endpoint (push services are HTTPS; plain HTTP only to the local fake on loopback in
 * local runs).
 */
export async function subscribeBrowser(db: Db, userId: string, rigId: string, body: Subscribe, userAgent: string) {
  const { subscription, timeZone, label } = body;
  const endpoint = new URL(subscription.endpoint);
  if (endpoint.protocol !== "https:" && !(getEnv().local && ["127.0.0.1", "localhost"].includes(endpoint.hostname))) {
    return { ok: false as const };
  }
  const id = await saveSubscription(db, userId, {
    endpoint: subscription.endpoint,
    p256dh: subscription.keys.p256dh,
    auth: subscription.keys.auth,
    label: label ?? deviceLabel(userAgent),
  });
  const prefs = await ensurePreferences(db, rigId, userId, validZone(timeZone));
  return { ok: true as const, id, prefs };
}

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
