import type { Route } from "./+types/api.v1.rigs.$rigId.readings";
import { deviceEnvelopeSchema } from "~/alerts/device-readings";
import { requestEvaluation } from "~/alerts/queue.server";
import { getDb } from "~/db/db.server";
import { getEnv } from "~/env.server";
import { apiError, issuesOf, readJson } from "~/lib/http";
import { clientAddress, createRateLimiter } from "~/lib/rate-limit.server";
import { findDevice, ingestDeviceReadings } from "~/repos/devices.server";

/** Per token: 120 requests a minute (a reading every half second, or batches). */
const perToken = createRateLimiter({ limit: 120, windowMs: 60_000 });
/** Per client address: 30 requests a minute with a missing or wrong token. */
const badTokens = createRateLimiter({ limit: 30, windowMs: 60_000 });

const noStore = { "cache-control": "no-store" };

export function loader() {
  return apiError(405, "method_not_allowed", "Use POST with a device token.", undefined, { allow: "POST" });
}

/**
 * POST /api/v1/rigs/:rigId/readings — a device aboard posts one reading or a batch with
 * `Authorization: Bearer <device token>`. No cookies: the token alone says which rig, and it
 * must be this rig's. Each reading is checked alone (refused ones are listed with their index;
 * the rest are stored). Idempotent on (device, takenAt). JSON Schema: /api/v1/device-readings.schema.json.
 */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "POST" });
  const receivedAt = new Date();
  const db = getDb();
  const header = request.headers.get("authorization") ?? "";
  const token = /^Bearer\s+(\S+)$/i.exec(header)?.[1] ?? null;
  const refuse = (status: number, code: string, message: string) => {
    const hit = badTokens.hit(clientAddress(request));
    if (!hit.ok) return apiError(429, "rate_limited", "Too many requests with a bad token; wait a minute.", undefined, { "retry-after": String(hit.retryAfterS) });
    return apiError(status, code, message, undefined, status === 401 ? { "www-authenticate": 'Bearer realm="tilldawn"' } : undefined);
  };
  if (!token) return refuse(401, "token_required", "Send the device token as Authorization: Bearer <token>.");
  const device = await findDevice(db, token);
  // A token of another rig is refused like an unknown one: it reveals nothing about this rig.
  if (!device || device.rigId !== params.rigId) return refuse(401, "bad_token", "This device token is not valid for this rig (unknown, revoked or another rig's).");

  const hit = perToken.hit(device.id);
  if (!hit.ok) return apiError(429, "rate_limited", `This device sent too many requests; try again in ${hit.retryAfterS} s.`, undefined, { "retry-after": String(hit.retryAfterS) });

  const body = await readJson(request, 2 * 1024 * 1024);
  if (!body.ok) return body.response;
  const envelope = deviceEnvelopeSchema.safeParse(body.body);
  if (!envelope.success) return apiError(400, "invalid_body", "Send one reading, or { \"readings\": [ … ] }.", issuesOf(envelope.error));
  const batch = "readings" in envelope.data && Array.isArray(envelope.data.readings);
  const items: unknown[] = batch ? (envelope.data as { readings: unknown[] }).readings : [envelope.data];

  const ingest = await ingestDeviceReadings(db, device, items, batch, receivedAt);
  if (!ingest.ok) {
    if (ingest.code === "model_unreadable") return apiError(409, "model_unreadable", "This rig's model could not be read, so readings cannot be checked against its bank.");
    return apiError(400, "invalid_reading", ingest.issues[0]!.message, ingest.issues);
  }
  const { results } = ingest;
  if (ingest.stored) await requestEvaluation(getEnv().DATABASE_URL, device.rigId);

  const count = (s: string) => results.filter((r) => r.status === s).length;
  return Response.json(
    { device: { id: device.id, name: device.name }, stored: count("stored"), duplicate: count("duplicate"), refused: count("refused"), results },
    { headers: noStore },
  );
}
