/**
 * Sends one push message with web-push (RFC 8291 aes128gcm payload encryption, RFC 8292 VAPID).
 * The answer says whether the push service took it, or the subscription is gone (404/410:
 * remove it), or it failed for now (retry).
 */
import webpush from "web-push";
import { loadVapidKeys } from "./vapid.server";

export type PushTarget = { endpoint: string; p256dh: string; auth: string };
export type PushPayload = { title: string; body: string; url: string; tag: string };
export type PushOutcome = { ok: true; status: number } | { ok: false; gone: boolean; status: number | null; message: string };

export type PushSender = (target: PushTarget, payload: PushPayload) => Promise<PushOutcome>;

export const sendPush: PushSender = async (target, payload) => {
  const vapid = loadVapidKeys();
  try {
    const res = await webpush.sendNotification(
      { endpoint: target.endpoint, keys: { p256dh: target.p256dh, auth: target.auth } },
      JSON.stringify(payload),
      { vapidDetails: vapid, TTL: 6 * 3600, urgency: "high", contentEncoding: "aes128gcm", timeout: 10_000 },
    );
    return { ok: true, status: res.statusCode };
  } catch (error) {
    const status = (error as { statusCode?: number }).statusCode ?? null;
    return { ok: false, gone: status === 404 || status === 410, status, message: (error as Error).message.slice(0, 300) };
  }
};
