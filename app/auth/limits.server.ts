/**
 * Limits on sign-in, kept in PostgreSQL so they hold across restarts and server processes.
 *
 * - Requests for a code: at most SIGN_IN_CODES_PER_EMAIL per e-mail address and
 *   SIGN_IN_CODES_PER_ADDRESS per client address in a 15-minute fixed window (`hitLimit`).
 * - Tries per code: counted on the issued code's own row (issued-codes.server.ts).
 */
import { createHash } from "node:crypto";
import { lt, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { issuedSignInCodes, rateLimitBuckets } from "~/db/schema";

export const CODE_REQUEST_WINDOW_S = 15 * 60;

export type LimitResult = { ok: true; count: number } | { ok: false; retryAfterS: number };

/** Counts one request against `key` in a fixed window; refuses once `limit` is reached. */
export async function hitLimit(db: Db, key: string, limit: number, windowS: number, now = new Date()): Promise<LimitResult> {
  const windowStart = new Date(now.getTime() - windowS * 1000);
  const stale = sql`${rateLimitBuckets.windowStartedAt} <= ${windowStart.toISOString()}::timestamptz`;
  const [row] = await db
    .insert(rateLimitBuckets)
    .values({ key, windowStartedAt: now, count: 1 })
    .onConflictDoUpdate({
      target: rateLimitBuckets.key,
      set: {
        count: sql`case when ${stale} then 1 else ${rateLimitBuckets.count} + 1 end`,
        windowStartedAt: sql`case when ${stale} then ${now.toISOString()}::timestamptz else ${rateLimitBuckets.windowStartedAt} end`,
      },
    })
    .returning({ count: rateLimitBuckets.count, windowStartedAt: rateLimitBuckets.windowStartedAt });
  if (!row) throw new Error("rate limit upsert returned nothing");
  if (row.count <= limit) return { ok: true, count: row.count };
  const endsAt = row.windowStartedAt.getTime() + windowS * 1000;
  return { ok: false, retryAfterS: Math.max(1, Math.ceil((endsAt - now.getTime()) / 1000)) };
}

export function hashOf(value: string): string {
  return createHash("sha256").update(value).digest("hex");
}

/** Housekeeping: forgets code rows and buckets older than a day. */
export async function pruneSignInRecords(db: Db): Promise<void> {
  const dayAgo = new Date(Date.now() - 86_400_000);
  await db.delete(issuedSignInCodes).where(lt(issuedSignInCodes.createdAt, dayAgo));
  await db.delete(rateLimitBuckets).where(lt(rateLimitBuckets.windowStartedAt, dayAgo));
}
