/**
 * The server's record of every e-mailed sign-in code, and the authority on who a code signs in.
 *
 * When a code is sent, a row keeps the address, an HMAC of the code, its expiry and a try count;
 * the browser gets only the row's random id (cookie SIGN_IN_COOKIE). At verify, under a row
 * lock, the try is counted first (so the sixth try is refused whatever the browser's cookies
 * say), then the code is compared with the row's hash, the expiry with the clock and the
 * strategy cookie's address with the row's. Only a matching, unused, unexpired row signs
 * anyone in, and then as the row's address.
 */
import { createDecipheriv, createHmac, timingSafeEqual } from "node:crypto";
import { eq } from "drizzle-orm";
import type { createCookie } from "react-router";
import type { Db } from "~/db/db.server";
import { issuedSignInCodes } from "~/db/schema";
import { getEnv } from "~/env.server";
import { isUuid } from "~/lib/ids";
import { signedCookie } from "./cookies.server";
import { CODE_VALID_MINUTES, MAX_CODE_ATTEMPTS } from "./constants";

export const SIGN_IN_COOKIE = "tilldawn_sign_in";

let cookie: ReturnType<typeof createCookie> | undefined;

/** The cookie that names this browser's issued code (its row id; nothing else). */
export function signInCookie() {
  if (!cookie) {
    cookie = signedCookie(SIGN_IN_COOKIE, CODE_VALID_MINUTES * 60);
  }
  return cookie;
}

export async function readIssuedCodeId(request: Request): Promise<string | null> {
  try {
    const value: unknown = await signInCookie().parse(request.headers.get("cookie"));
    return typeof value === "string" && isUuid(value) ? value : null;
  } catch {
    return null;
  }
}

export function clearSignInCookie(): Promise<string> {
  return signInCookie().serialize("", { maxAge: 0, expires: new Date(0) });
}

function codeHash(id: string, code: string): string {
  return createHmac("sha256", getEnv().TOTP_SECRET).update(`${id}:${code}`).digest("hex");
}

/** Records a code just e-mailed to `email` under the id the browser's cookie will carry. */
export async function recordIssuedCode(db: Db, id: string, email: string, code: string, now = new Date()): Promise<void> {
  await db.insert(issuedSignInCodes).values({
    id,
    email: email.toLowerCase(),
    codeHash: codeHash(id, code),
    expiresAt: new Date(now.getTime() + CODE_VALID_MINUTES * 60_000),
  });
}

export type CodeCheck =
  | { ok: true; email: string }
  | { ok: false; reason: "unknown" | "used" | "expired" | "wrong" }
  /** `retryAfterS`: until the dead code would have expired (a new code can be asked for now). */
  | { ok: false; reason: "too_many"; retryAfterS: number };

/**
 * Counts one try at issued code `id` and answers whether `code` signs in, and as whom. The try
 * is counted (and a match marked used) in the same transaction that reads the row.
 */
export async function checkIssuedCode(
  db: Db,
  id: string | null,
  code: string | null,
  claimedEmail: string | null,
  now = new Date(),
): Promise<CodeCheck> {
  if (!id) return { ok: false, reason: "unknown" };
  return db.transaction(async (tx) => {
    const [row] = await tx.select().from(issuedSignInCodes).where(eq(issuedSignInCodes.id, id)).for("update");
    if (!row) return { ok: false, reason: "unknown" } as const;
    if (row.usedAt) return { ok: false, reason: "used" } as const;
    if (row.tries >= MAX_CODE_ATTEMPTS) {
      const retryAfterS = Math.max(1, Math.ceil((row.expiresAt.getTime() - now.getTime()) / 1000));
      return { ok: false, reason: "too_many", retryAfterS } as const;
    }
    await tx.update(issuedSignInCodes).set({ tries: row.tries + 1 }).where(eq(issuedSignInCodes.id, id));
    if (now.getTime() > row.expiresAt.getTime()) return { ok: false, reason: "expired" } as const;
    const given = Buffer.from(codeHash(id, code ?? ""), "hex");
    const stored = Buffer.from(row.codeHash, "hex");
    const matches = code !== null && given.length === stored.length && timingSafeEqual(given, stored);
    if (!matches || claimedEmail?.toLowerCase() !== row.email) return { ok: false, reason: "wrong" } as const;
    await tx.update(issuedSignInCodes).set({ usedAt: now }).where(eq(issuedSignInCodes.id, id));
    return { ok: true, email: row.email } as const;
  });
}

/**
 * The code inside a sign-in link's `t` (a compact JWE, dir + A256GCM, encrypted by the
 * strategy with TOTP_SECRET), or null when it does not decrypt. Node's crypto, no extra library.
 */
export function codeFromMagicLinkToken(token: string | null): string | null {
  if (!token) return null;
  const parts = token.split(".");
  if (parts.length !== 5) return null;
  const [header, key, iv, ciphertext, tag] = parts as [string, string, string, string, string];
  if (key !== "") return null;
  try {
    const decipher = createDecipheriv("aes-256-gcm", Buffer.from(getEnv().TOTP_SECRET, "hex"), Buffer.from(iv, "base64url"));
    decipher.setAAD(Buffer.from(header, "ascii"));
    decipher.setAuthTag(Buffer.from(tag, "base64url"));
    const plain = Buffer.concat([decipher.update(Buffer.from(ciphertext, "base64url")), decipher.final()]).toString("utf8");
    const parsed = JSON.parse(plain) as { code?: unknown };
    return typeof parsed.code === "string" ? parsed.code : null;
  } catch {
    return null;
  }
}
