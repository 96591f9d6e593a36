/**
 * Limits on sign-in, kept in PostgreSQL so they hold across restarts and server processes.
 *
 * - Requests for a code: at most SIGN_IN_CODES_PER_EMAIL per e-mail address and
 *   SIGN_IN_CODES_PER_ADDRESS per client address in a 15-minute fixed window (`hitLimit`).
 * - Tries per code: at most MAX_CODE_ATTEMPTS, counted against a SHA-256 of the encrypted
 *   code in the browser's sign-in cookie (`recordCodeAttempt`); a used code is never accepted
 *   again, even if the browser replays the old cookie.
 */
import { createHash } from "node:crypto";
import { eq, lt, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { rateLimitBuckets, signInCodes } from "~/db/schema";
import { MAX_CODE_ATTEMPTS } from "./constants";

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

export type AttemptResult = { ok: true; attempt: number } | { ok: false; reason: "used" | "too_many" };

/** Counts one try at the code whose encrypted form is `jwe`; refuses used codes and the 6th try. */
export async function recordCodeAttempt(db: Db, jwe: string, email: string): Promise<AttemptResult> {
  const [row] = await db
    .insert(signInCodes)
    .values({ codeHash: hashOf(jwe), email: email.toLowerCase(), attempts: 1 })
    .onConflictDoUpdate({ target: signInCodes.codeHash, set: { attempts: sql`${signInCodes.attempts} + 1` } })
    .returning({ attempts: signInCodes.attempts, consumedAt: signInCodes.consumedAt });
  if (!row) throw new Error("attempt upsert returned nothing");
  if (row.consumedAt) return { ok: false, reason: "used" };
  if (row.attempts > MAX_CODE_ATTEMPTS) return { ok: false, reason: "too_many" };
  return { ok: true, attempt: row.attempts };
}

/** Marks a code used after a successful sign-in. */
export async function consumeCode(db: Db, jwe: string): Promise<void> {
  await db.update(signInCodes).set({ consumedAt: new Date() }).where(eq(signInCodes.codeHash, hashOf(jwe)));
}

/** Housekeeping: forgets code rows and buckets older than a day. */
export async function pruneSignInRecords(db: Db): Promise<void> {
  const dayAgo = new Date(Date.now() - 86_400_000);
  await db.delete(signInCodes).where(lt(signInCodes.createdAt, dayAgo));
  await db.delete(rateLimitBuckets).where(lt(rateLimitBuckets.windowStartedAt, dayAgo));
}
