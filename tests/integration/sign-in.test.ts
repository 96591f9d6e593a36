import { afterAll, afterEach, beforeEach, describe, expect, test, vi } from "vitest";
import { eq } from "drizzle-orm";
import { sessions, users } from "~/db/schema";
import { setMailSender, type Mail } from "~/mail/mailer.server";
import { getUser, getUserAndRefresh } from "~/auth/session.server";
import { hitLimit } from "~/auth/limits.server";
import * as signInRoute from "~/routes/sign-in";
import * as verifyRoute from "~/routes/auth.verify";
import * as signOutRoute from "~/routes/sign-out";
import * as accountRoute from "~/routes/account";
import { openTestDb } from "./db";
import { callRoute, cookieFrom, makeUser, sessionCookieFor, type CallResult } from "./auth";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

let outbox: Mail[] = [];
beforeEach(() => {
  outbox = [];
  setMailSender(async (mail) => void outbox.push(mail));
});
afterEach(() => {
  setMailSender(null);
  vi.useRealTimers();
});

/** A client address of its own per test, so the per-address limit never leaks between tests. */
const address = () => `198.51.100.${Math.floor(Math.random() * 250) + 1}-${crypto.randomUUID().slice(0, 6)}`;
const uniqueEmail = (who = "new") => `${who}-${crypto.randomUUID().slice(0, 8)}@example.net`;

async function askForCode(email: string, ip = address(), redirectTo = "/rigs") {
  const result = await callRoute(signInRoute.action, {
    path: "/sign-in",
    form: { intent: "send", email, redirectTo },
    context: { clientAddress: ip },
  });
  return { result, cookie: codeCookies(result) };
}

/** The browser's cookies after asking for a code: the strategy's and the issued code's id. */
function codeCookies(result: CallResult): string | null {
  const pair = [cookieFrom(result, "_totp"), cookieFrom(result, "tilldawn_sign_in")].filter(Boolean);
  return pair.length ? pair.join("; ") : null;
}

function codeIn(mail: Mail | undefined): string {
  const code = /sign-in code is (\d{6})/.exec(mail?.text ?? "")?.[1];
  if (!code) throw new Error(`no code in ${mail?.text}`);
  return code;
}

function typeCode(cookie: string | null, code: string, redirectTo = "/rigs"): Promise<CallResult> {
  return callRoute(signInRoute.action, { path: "/sign-in", cookie, form: { intent: "verify", code, redirectTo } });
}

describe("Signing in with an e-mailed code", () => {
  test("a new address gets a code by e-mail (text and HTML), and the code creates the account and a session", async () => {
    const email = uniqueEmail();
    const { result, cookie } = await askForCode(email.toUpperCase());
    expect(result.status).toBe(302);
    expect(result.location).toBe("/sign-in?redirectTo=%2Frigs");
    expect(cookie).toMatch(/^_totp=/);
    expect(outbox).toHaveLength(1);
    expect(outbox[0]!.to).toBe(email);
    expect(outbox[0]!.text).toMatch(/sign-in code is \d{6}/);
    expect(outbox[0]!.html).toContain(codeIn(outbox[0]));
    expect(outbox[0]!.text).toContain("/auth/verify?t=");

    const signedIn = await typeCode(cookie, codeIn(outbox[0]));
    expect(signedIn.status).toBe(302);
    expect(signedIn.location).toBe("/welcome?redirectTo=%2Frigs"); // a new account is asked its name once
    const session = cookieFrom(signedIn, "tilldawn_session");
    const setCookie = signedIn.headers.getSetCookie().find((c) => c.startsWith("tilldawn_session="))!;
    expect(setCookie).toMatch(/HttpOnly/i);
    expect(setCookie).toMatch(/SameSite=Lax/i);
    const user = await getUser(new Request("http://tilldawn.test/", { headers: { cookie: session! } }), db);
    expect(user?.email).toBe(email);
    expect(user?.name).toBe("");
  });

  test("a known address signs in to its existing account and goes where it was headed", async () => {
    const ada = await makeUser(db, "Ada");
    const { cookie } = await askForCode(ada.email, address(), "/account");
    const signedIn = await typeCode(cookie, codeIn(outbox[0]), "/account");
    expect(signedIn.location).toBe("/account");
    const all = await db.select().from(users).where(eq(users.email, ada.email));
    expect(all).toHaveLength(1);
  });

  test("a wrong code is refused with a clear message, and the right one still works", async () => {
    const { cookie } = await askForCode(uniqueEmail());
    const wrong = await typeCode(cookie, codeIn(outbox[0]) === "000000" ? "111111" : "000000");
    expect(wrong.status).toBe(302);
    const failed = await callRoute(signInRoute.loader, { path: wrong.location!, cookie: cookieFrom(wrong, "_totp") });
    expect((failed.body as { error: string }).error).toBe("That code is not right. Check the e-mail and try again.");
    const right = await typeCode(cookie, codeIn(outbox[0]));
    expect(cookieFrom(right, "tilldawn_session")).toBeTruthy();
  });

  test("after 5 tries on one code, even the right code is refused with 429", async () => {
    const { cookie } = await askForCode(uniqueEmail());
    const code = codeIn(outbox[0]);
    const wrong = code === "000000" ? "111111" : "000000";
    for (let i = 0; i < 5; i++) expect((await typeCode(cookie, wrong)).status).toBe(302);
    const capped = await typeCode(cookie, code);
    expect(capped.status).toBe(429);
    expect((capped.body as { error: string }).error).toMatch(/Too many wrong tries/);
    expect(cookieFrom(capped, "tilldawn_session")).toBeNull();
  });

  test("a code works once: replaying the old cookie with the same code is refused", async () => {
    const { cookie } = await askForCode(uniqueEmail());
    const code = codeIn(outbox[0]);
    expect(cookieFrom(await typeCode(cookie, code), "tilldawn_session")).toBeTruthy();
    const again = await typeCode(cookie, code);
    expect(again.status).toBe(400);
    expect((again.body as { error: string }).error).toMatch(/already been used/);
  });

  test("a code expires after 10 minutes", async () => {
    vi.useFakeTimers({ toFake: ["Date"] });
    const start = Date.now();
    const { cookie } = await askForCode(uniqueEmail());
    vi.setSystemTime(start + 10 * 60_000 + 1_000);
    const late = await typeCode(cookie, codeIn(outbox[0]));
    expect(late.status).toBe(302);
    expect(cookieFrom(late, "tilldawn_session")).toBeNull();
    const page = await callRoute(signInRoute.loader, { path: "/sign-in", cookie: cookieFrom(late, "_totp") });
    expect((page.body as { error: string }).error).toMatch(/expired/);
  });

  test("a code typed within 10 minutes still works", async () => {
    vi.useFakeTimers({ toFake: ["Date"] });
    const start = Date.now();
    const { cookie } = await askForCode(uniqueEmail());
    vi.setSystemTime(start + 9 * 60_000);
    expect(cookieFrom(await typeCode(cookie, codeIn(outbox[0])), "tilldawn_session")).toBeTruthy();
  });

  test("the magic link signs in in the browser that asked, and explains itself in any other", async () => {
    const { cookie } = await askForCode(uniqueEmail(), address(), "/account");
    const link = /(http\S+\/auth\/verify\S+)/.exec(outbox[0]!.text)![1]!;
    const url = new URL(link);
    expect(url.searchParams.get("redirectTo")).toBe("/account");
    const elsewhere = await callRoute(verifyRoute.loader, { path: `${url.pathname}${url.search}` });
    expect(elsewhere.status).toBe(400);
    const here = await callRoute(verifyRoute.loader, { path: `${url.pathname}${url.search}`, cookie });
    expect(here.status).toBe(302);
    expect(here.location).toBe("/welcome?redirectTo=%2Faccount");
    expect(cookieFrom(here, "tilldawn_session")).toBeTruthy();
  });

  test("a malformed address is answered 400 with what was typed kept", async () => {
    const { result } = await askForCode("ada at juniper");
    expect(result.status).toBe(400);
    expect(result.body).toMatchObject({ values: { email: "ada at juniper" }, fieldErrors: { email: expect.any(String) } });
    expect(outbox).toHaveLength(0);
  });
});

describe("Limits on asking for codes", () => {
  test("one address gets at most 5 codes in 15 minutes; the 6th is answered 429 with when to retry", async () => {
    const email = uniqueEmail();
    for (let i = 0; i < 5; i++) expect((await askForCode(email)).result.status).toBe(302);
    const { result } = await askForCode(email);
    expect(result.status).toBe(429);
    const retry = Number(result.headers.get("retry-after"));
    expect(retry).toBeGreaterThan(0);
    expect(retry).toBeLessThanOrEqual(15 * 60);
    expect((result.body as { error: string }).error).toMatch(/Try again in \d+ minutes?/);
    expect((result.body as { values: { email: string } }).values.email).toBe(email);
    expect(outbox).toHaveLength(5);
  });

  test("one client address asks for at most 20 codes in 15 minutes, whatever the e-mail addresses", async () => {
    const ip = address();
    for (let i = 0; i < 20; i++) expect((await askForCode(uniqueEmail(), ip)).result.status).toBe(302);
    const { result } = await askForCode(uniqueEmail(), ip);
    expect(result.status).toBe(429);
    expect((result.body as { error: string }).error).toMatch(/from this network/);
  });

  test("the counting window starts again after 15 minutes", async () => {
    const key = `test:${crypto.randomUUID()}`;
    const t0 = new Date();
    expect((await hitLimit(db, key, 2, 900, t0)).ok).toBe(true);
    expect((await hitLimit(db, key, 2, 900, t0)).ok).toBe(true);
    const refused = await hitLimit(db, key, 2, 900, new Date(t0.getTime() + 60_000));
    expect(refused).toEqual({ ok: false, retryAfterS: 840 });
    expect((await hitLimit(db, key, 2, 900, new Date(t0.getTime() + 900_000))).ok).toBe(true);
  });
});

describe("Sessions", () => {
  test("signing out deletes the session row: the old cookie no longer works", async () => {
    const user = await makeUser(db);
    const cookie = await sessionCookieFor(db, user.id);
    const out = await callRoute(signOutRoute.action, { path: "/sign-out", method: "POST", cookie });
    expect(out.status).toBe(302);
    expect(out.headers.getSetCookie().join()).toMatch(/tilldawn_session=;.*Max-Age=0/i);
    expect(await getUser(new Request("http://tilldawn.test/", { headers: { cookie } }), db)).toBeNull();
  });

  test("signing out everywhere ends every session of the person, and only theirs", async () => {
    const user = await makeUser(db);
    const other = await makeUser(db);
    const phone = await sessionCookieFor(db, user.id);
    const laptop = await sessionCookieFor(db, user.id);
    const theirs = await sessionCookieFor(db, other.id);
    const out = await callRoute(accountRoute.action, { path: "/account", cookie: phone, form: { intent: "sign-out-everywhere" } });
    expect(out.status).toBe(302);
    expect(await db.select().from(sessions).where(eq(sessions.userId, user.id))).toHaveLength(0);
    const req = (c: string) => new Request("http://tilldawn.test/", { headers: { cookie: c } });
    expect(await getUser(req(laptop), db)).toBeNull();
    expect((await getUser(req(theirs), db))?.id).toBe(other.id);
  });

  test("a tampered cookie or an expired session is not signed in", async () => {
    const user = await makeUser(db);
    const cookie = await sessionCookieFor(db, user.id);
    const tampered = cookie.replace(/.(?=%3D|\.)/, (c) => (c === "a" ? "b" : "a"));
    const req = (c: string) => new Request("http://tilldawn.test/", { headers: { cookie: c } });
    expect(await getUser(req(tampered), db)).toBeNull();
    await db.update(sessions).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(sessions.userId, user.id));
    expect(await getUser(req(cookie), db)).toBeNull();
  });

  test("a session in use rolls its expiry forward and re-sends the cookie", async () => {
    const user = await makeUser(db);
    const cookie = await sessionCookieFor(db, user.id);
    const old = new Date(Date.now() - 2 * 3600_000);
    await db.update(sessions).set({ lastSeenAt: old, expiresAt: new Date(Date.now() + 86_400_000) }).where(eq(sessions.userId, user.id));
    const { user: seen, setCookie } = await getUserAndRefresh(new Request("http://tilldawn.test/", { headers: { cookie } }), db);
    expect(seen?.id).toBe(user.id);
    expect(setCookie).toMatch(/^tilldawn_session=/);
    const [row] = await db.select().from(sessions).where(eq(sessions.userId, user.id));
    expect(row!.expiresAt.getTime()).toBeGreaterThan(Date.now() + 29 * 86_400_000);
  });
});
