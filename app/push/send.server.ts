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

/**
 * web-push builds the request (encryption, VAPID JWT, headers); we send it with fetch, which
 * also reaches the local fake push service over plain HTTP on loopback.
 */
export const sendPush: PushSender = async (target, payload) => {
  const vapid = loadVapidKeys();
  let status: number | null = null;
  try {
    const details = webpush.generateRequestDetails(
      { endpoint: target.endpoint, keys: { p256dh: target.p256dh, auth: target.auth } },
      JSON.stringify(payload),
      { vapidDetails: vapid, TTL: 6 * 3600, urgency: "high", contentEncoding: "aes128gcm" },
    );
    const url = new URL(details.endpoint);
    if (url.protocol !== "https:" && !(url.protocol === "http:" && isLoopback(url.hostname))) {
      return { ok: false, gone: true, status: null, message: "push endpoints must be https" };
    }
    const res = await fetch(details.endpoint, {
      method: details.method,
      headers: details.headers as Record<string, string>,
      body: details.body ? new Uint8Array(details.body) : null,
      signal: AbortSignal.timeout(10_000),
    });
    status = res.status;
    const text = await res.text().catch(() => "");
    if (res.status >= 200 && res.status < 300) return { ok: true, status };
    return { ok: false, gone: status === 404 || status === 410, status, message: text.slice(0, 300) };
  } catch (error) {
    return { ok: false, gone: false, status, message: (error as Error).message.slice(0, 300) };
  }
};

function isLoopback(host: string) {
  return host === "127.0.0.1" || host === "localhost" || host === "[::1]";
}
