/**
 * Sessions: a signed cookie carrying a session id, and a `sessions` row that makes the session
 * real. Deleting the row (sign out, sign out everywhere, account deletion) ends it at once.
 * Expiry rolls: each use pushes `expiresAt` SESSION_DAYS ahead (written at most once per
 * TOUCH_AFTER_MS, and the cookie re-sent then by the root loader).
 */
import { and, eq, gt, lt } from "drizzle-orm";
import { redirect, type createCookie } from "react-router";
import { getDb, type Db } from "~/db/db.server";
import { sessions, userPreferences, users } from "~/db/schema";
import { appOrigin } from "~/env.server";
import { apiError } from "~/lib/http";
import { signedCookie } from "./cookies.server";
import { defaultPreferences, type Preferences } from "~/schemas/account";

export const SESSION_COOKIE = "tilldawn_session";
export const SESSION_DAYS = 30;
const DAY_MS = 86_400_000;
const TOUCH_AFTER_MS = 60 * 60 * 1000;

let cookie: ReturnType<typeof createCookie> | undefined;

/** The signed session cookie (httpOnly, SameSite=Lax, Secure when APP_URL is https). */
export function sessionCookie() {
  if (!cookie) {
    cookie = signedCookie(SESSION_COOKIE, SESSION_DAYS * 24 * 60 * 60);
  }
  return cookie;
}

export type SessionUser = {
  id: string;
  email: string;
  name: string;
  sessionId: string;
  preferences: Preferences;
};

/** Creates a session row for a user and answers the Set-Cookie value that carries it. */
export async function createSession(db: Db, userId: string, userAgent = ""): Promise<{ id: string; setCookie: string }> {
  const [row] = await db
    .insert(sessions)
    .values({ userId, userAgent: userAgent.slice(0, 300), expiresAt: new Date(Date.now() + SESSION_DAYS * DAY_MS) })
    .returning({ id: sessions.id });
  if (!row) throw new Error("session insert returned nothing");
  return { id: row.id, setCookie: await sessionCookie().serialize(row.id) };
}

/** The session id in the request's cookie, if its signature is good. */
export async function readSessionId(request: Request): Promise<string | null> {
  const value: unknown = await sessionCookie().parse(request.headers.get("cookie"));
  return typeof value === "string" && /^[0-9a-f-]{36}$/.test(value) ? value : null;
}

async function loadSession(db: Db, sessionId: string) {
  const [row] = await db
    .select({
      sessionId: sessions.id,
      lastSeenAt: sessions.lastSeenAt,
      id: users.id,
      email: users.email,
      name: users.name,
      lengthUnit: userPreferences.lengthUnit,
      cableUnit: userPreferences.cableUnit,
      temperatureUnit: userPreferences.temperatureUnit,
      nightDefault: userPreferences.nightDefault,
      clock: userPreferences.clock,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(userPreferences, eq(userPreferences.userId, users.id))
    .where(and(eq(sessions.id, sessionId), gt(sessions.expiresAt, new Date())));
  if (!row) return null;
  const user: SessionUser = {
    id: row.id,
    email: row.email,
    name: row.name,
    sessionId: row.sessionId,
    preferences: {
      lengthUnit: row.lengthUnit ?? defaultPreferences.lengthUnit,
      cableUnit: row.cableUnit ?? defaultPreferences.cableUnit,
      temperatureUnit: row.temperatureUnit ?? defaultPreferences.temperatureUnit,
      nightDefault: row.nightDefault ?? defaultPreferences.nightDefault,
      clock: row.clock ?? defaultPreferences.clock,
    },
  };
  return { user, lastSeenAt: row.lastSeenAt };
}

/** The signed-in person, or null (no cookie, bad signature, ended or expired session). */
export async function getUser(request: Request, db: Db = getDb()): Promise<SessionUser | null> {
  const sessionId = await readSessionId(request);
  if (!sessionId) return null;
  return (await loadSession(db, sessionId))?.user ?? null;
}

/**
 * Like getUser, and rolls the session's expiry forward when it was last touched over an hour
 * ago; `setCookie` is then the refreshed cookie to send back (the root loader does this).
 */
export async function getUserAndRefresh(
  request: Request,
  db: Db = getDb(),
): Promise<{ user: SessionUser | null; setCookie: string | null }> {
  const sessionId = await readSessionId(request);
  if (!sessionId) return { user: null, setCookie: null };
  const found = await loadSession(db, sessionId);
  if (!found) return { user: null, setCookie: null };
  if (Date.now() - found.lastSeenAt.getTime() < TOUCH_AFTER_MS) return { user: found.user, setCookie: null };
  await db
    .update(sessions)
    .set({ lastSeenAt: new Date(), expiresAt: new Date(Date.now() + SESSION_DAYS * DAY_MS) })
    .where(eq(sessions.id, sessionId));
  return { user: found.user, setCookie: await sessionCookie().serialize(sessionId) };
}

/** True for paths whose callers expect JSON (a 401 answer instead of a redirect). */
export function isApiRequest(request: Request): boolean {
  return new URL(request.url).pathname.startsWith("/api/");
}

/** Where to send someone who must sign in first, coming back here afterwards. */
export function signInUrl(request: Request): string {
  const url = new URL(request.url);
  const back = `${url.pathname}${url.search}`;
  return back === "/" ? "/sign-in" : `/sign-in?${new URLSearchParams({ redirectTo: back })}`;
}

/**
 * The signed-in person, or a thrown answer: a redirect to /sign-in for pages, a 401 JSON error
 * for /api/ routes.
 */
export async function requireUser(request: Request, db: Db = getDb()): Promise<SessionUser> {
  const user = await getUser(request, db);
  if (user) return user;
  if (isApiRequest(request)) throw apiError(401, "unauthenticated", "Sign in first.");
  throw redirect(signInUrl(request));
}

/** Ends this browser's session: deletes its row and answers a Set-Cookie that clears it. */
export async function endSession(request: Request, db: Db = getDb()): Promise<string> {
  const sessionId = await readSessionId(request);
  if (sessionId) await db.delete(sessions).where(eq(sessions.id, sessionId));
  return clearSessionCookie();
}

export function clearSessionCookie(): Promise<string> {
  return sessionCookie().serialize("", { maxAge: 0, expires: new Date(0) });
}

/** Ends every session of a person (all their browsers and phones). */
export async function endAllSessions(db: Db, userId: string): Promise<number> {
  const ended = await db.delete(sessions).where(eq(sessions.userId, userId)).returning({ id: sessions.id });
  return ended.length;
}

/** Housekeeping: removes expired rows. */
export async function deleteExpiredSessions(db: Db): Promise<void> {
  await db.delete(sessions).where(lt(sessions.expiresAt, new Date()));
}

/**
 * A redirect target from a form or query is followed only when it stays on this site: it is
 * parsed with `new URL` against APP_URL's origin (which also drops the tabs and newlines a
 * browser would drop), and only a same-origin path comes back.
 */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback = "/"): string {
  if (typeof to !== "string" || !to.startsWith("/")) return fallback;
  const base = new URL(appOrigin());
  let url: URL;
  try {
    url = new URL(to, base);
  } catch {
    return fallback;
  }
  if (url.origin !== base.origin) return fallback;
  return `${url.pathname}${url.search}${url.hash}`;
}
