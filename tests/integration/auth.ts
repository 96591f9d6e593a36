/**
 * Signing in for route and API tests, without the e-mail round trip.
 *
 *   const cookie = await sessionCookieFor(db, user.id);          // "tilldawn_session=…"
 *   const res = await callRoute(loader, { path: "/rigs", cookie });
 *   const res = await callRoute(action, { path: `/rigs/${id}/members`, cookie, form: { intent: "invite", … } });
 *
 * `callRoute` runs a route module's loader or action with a real Request (Origin set to our
 * own, so the CSRF check passes unless you pass `origin`) and answers { status, location,
 * body } whether the module returned or threw.
 */
import { users } from "~/db/schema";
import type { Db } from "~/db/db.server";
import { createSession } from "~/auth/session.server";

export const TEST_ORIGIN = "http://tilldawn.test";

/** A new person with a unique address (the tag keeps parallel test files apart). */
export async function makeUser(db: Db, name = "Tester", tag = crypto.randomUUID().slice(0, 8)) {
  const [user] = await db
    .insert(users)
    .values({ email: `${name.toLowerCase()}-${tag}@juniper.example`, name })
    .returning();
  return user!;
}

/** A `Cookie` header value for a fresh session of this user. */
export async function sessionCookieFor(db: Db, userId: string): Promise<string> {
  const { setCookie } = await createSession(db, userId, "integration test");
  return setCookie.split(";")[0]!;
}

export type CallOptions = {
  path: string;
  method?: string;
  cookie?: string | null;
  /** Form fields (sent urlencoded); implies POST. */
  form?: Record<string, string>;
  /** A JSON body; implies POST. */
  json?: unknown;
  /** A raw body (string or stream), sent with the headers given; implies POST. */
  body?: BodyInit | null;
  /** The Origin header; defaults to our own for POST. Pass null to send none. */
  origin?: string | null;
  headers?: Record<string, string>;
  params?: Record<string, string>;
  /** The load context the server hands every loader and action (e.g. the client's address). */
  context?: Record<string, unknown>;
};

export function makeRequest(options: CallOptions): Request {
  const method = options.method ?? (options.form || options.json !== undefined || options.body !== undefined ? "POST" : "GET");
  const headers = new Headers(options.headers);
  if (options.cookie) headers.set("cookie", options.cookie);
  const origin = options.origin === undefined ? (method === "GET" ? null : TEST_ORIGIN) : options.origin;
  if (origin) headers.set("origin", origin);
  let body: BodyInit | undefined;
  if (options.form) {
    headers.set("content-type", "application/x-www-form-urlencoded");
    body = new URLSearchParams(options.form);
  } else if (options.json !== undefined) {
    headers.set("content-type", "application/json");
    body = JSON.stringify(options.json);
  } else if (options.body !== undefined) {
    body = options.body ?? undefined;
  }
  return new Request(new URL(options.path, TEST_ORIGIN), { method, headers, body, duplex: "half" } as RequestInit);
}

export type CallResult = { status: number; location: string | null; headers: Headers; body: unknown };

type RouteFunction = (args: { request: Request; params: Record<string, string>; context: unknown }) => unknown;

/** Runs a loader or action and normalises what it returned or threw. */
export async function callRoute(fn: unknown, options: CallOptions): Promise<CallResult> {
  const request = makeRequest(options);
  try {
    return await normalise(await (fn as RouteFunction)({ request, params: options.params ?? {}, context: options.context ?? {} }));
  } catch (thrown) {
    if (thrown instanceof Response || isDataWithInit(thrown)) return normalise(thrown);
    throw thrown;
  }
}

function isDataWithInit(x: unknown): x is { data: unknown; init: ResponseInit | null } {
  return typeof x === "object" && x !== null && (x as { type?: unknown }).type === "DataWithResponseInit";
}

async function normalise(result: unknown): Promise<CallResult> {
  if (result instanceof Response) {
    const text = await result.text();
    let body: unknown = text;
    try {
      body = JSON.parse(text);
    } catch {
      /* not JSON */
    }
    return { status: result.status, location: result.headers.get("location"), headers: result.headers, body };
  }
  if (isDataWithInit(result)) {
    const headers = new Headers(result.init?.headers);
    return { status: result.init?.status ?? 200, location: headers.get("location"), headers, body: result.data };
  }
  return { status: 200, location: null, headers: new Headers(), body: result };
}

/** The value of one cookie from a result's Set-Cookie headers, as a `name=value` pair. */
export function cookieFrom(result: CallResult, name: string): string | null {
  for (const line of result.headers.getSetCookie()) {
    if (line.startsWith(`${name}=`)) return line.split(";")[0]!;
  }
  return null;
}
