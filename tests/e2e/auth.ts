/**
 * Browser sign-in without the e-mail round trip, for browser tests:
 *
 *   const context = await phoneContext(browser);
 *   await signIn(context, "ada@juniper.example");   // Ada, Sam or Noor from the demo seed
 *   const page = await context.newPage();
 *
 * It creates a session row directly in the test database (DATABASE_URL) and puts the signed
 * session cookie on the context. An address with no account gets one (named from the demo
 * people when it is one of them). Call `closeAuthDb()` in afterAll if you want the pool gone
 * before the file ends (it is otherwise closed when the worker exits).
 */
import { eq, sql } from "drizzle-orm";
import type { BrowserContext } from "playwright-core";
import { createDb } from "~/db/db.server";
import { users } from "~/db/schema";
import { createSession, SESSION_COOKIE } from "~/auth/session.server";
import { demoPeople } from "../fixtures/demo";
import { baseUrl } from "./browser";

let handle: ReturnType<typeof createDb> | undefined;
function db() {
  handle ??= createDb(process.env.DATABASE_URL ?? "postgres://tilldawn@127.0.0.1:54339/tilldawn_test", 2);
  return handle.db;
}

export async function closeAuthDb(): Promise<void> {
  await handle?.pool.end();
  handle = undefined;
}

/** Signs `email` in on this browser context; answers the user's id. */
export async function signIn(context: BrowserContext, email: string): Promise<string> {
  const normalized = email.toLowerCase();
  let [user] = await db().select().from(users).where(eq(sql`lower(${users.email})`, normalized));
  if (!user) {
    const name = demoPeople.find((p) => p.email === normalized)?.name ?? normalized.split("@")[0]!;
    [user] = await db().insert(users).values({ email: normalized, name }).returning();
  }
  const { setCookie } = await createSession(db(), user!.id, "browser test");
  const value = setCookie.split(";")[0]!.slice(SESSION_COOKIE.length + 1);
  await context.addCookies([{ name: SESSION_COOKIE, value, url: baseUrl(), httpOnly: true, sameSite: "Lax" }]);
  return user!.id;
}
