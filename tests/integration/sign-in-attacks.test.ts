// Findings 1 and 2 of issue 9: nothing a browser can edit decides who a code signs in, and the
// tries on one issued code are counted on the server.
import { afterAll, afterEach, beforeEach, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import { issuedSignInCodes } from "~/db/schema";
import { setMailSender, type Mail } from "~/mail/mailer.server";
import { getUser } from "~/auth/session.server";
import * as signInRoute from "~/routes/sign-in";
import * as verifyRoute from "~/routes/auth.verify";
import { openTestDb } from "./db";
import { callRoute, cookieFrom, makeUser, type CallResult } from "./auth";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

let outbox: Mail[] = [];
beforeEach(() => {
  outbox = [];
  setMailSender(async (mail) => void outbox.push(mail));
});
afterEach(() => setMailSender(null));

const uniqueEmail = (who = "mallory") => `${who}-${crypto.randomUUID().slice(0, 8)}@example.net`;
const ip = () => `203.0.113.${Math.floor(Math.random() * 250) + 1}-${crypto.randomUUID().slice(0, 6)}`;

async function askForCode(email: string) {
  const result = await callRoute(signInRoute.action, {
    path: "/sign-in",
    form: { intent: "send", email, redirectTo: "/" },
    context: { clientAddress: ip() },
  });
  expect(result.status).toBe(302);
  const mail = outbox.at(-1)!;
  return {
    totp: cookieFrom(result, "_totp")!,
    issued: cookieFrom(result, "tilldawn_sign_in")!,
    code: /sign-in code is (\d{6})/.exec(mail.text)![1]!,
    link: /(http\S+\/auth\/verify\S+)/.exec(mail.text)![1]!,
  };
}

/** The strategy's cookie with its `email` parameter replaced, encrypted part kept. */
function withEmail(totpCookie: string, email: string): string {
  const params = paramsOf(totpCookie);
  params.set("email", email);
  return `_totp="${params.toString()}"`;
}

function paramsOf(totpCookie: string): URLSearchParams {
  return new URLSearchParams(totpCookie.slice("_totp=".length).replace(/^"|"$/g, ""));
}

/**
 * The same encrypted code spelt another way: the last base64url character of the JWE's tag
 * carries 4 unused bits, so 16 spellings decode to the same bytes (the attack in issue 9).
 */
function respelled(totpCookie: string, n: number): string {
  const params = paramsOf(totpCookie);
  const totp = JSON.parse(params.get("totp")!) as { jwe: string; attempts: number };
  const alphabet = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_";
  const last = alphabet.indexOf(totp.jwe.at(-1)!);
  totp.jwe = totp.jwe.slice(0, -1) + alphabet[(last & 0b110000) | (n % 16)];
  params.set("totp", JSON.stringify(totp));
  return `_totp="${params.toString()}"`;
}

async function signedInAs(result: CallResult): Promise<string | null> {
  const session = cookieFrom(result, "tilldawn_session");
  if (!session) return null;
  const user = await getUser(new Request("http://tilldawn.test/", { headers: { cookie: session } }), db);
  return user?.email ?? null;
}

const verify = (cookie: string, code: string) =>
  callRoute(signInRoute.action, { path: "/sign-in", cookie, form: { intent: "verify", code, redirectTo: "/" } });

describe("A sign-in code signs in only the address it was sent to", () => {
  test("swapping the address in the code cookie and typing one's own code does not sign in as the other person", async () => {
    const victim = await makeUser(db, "Ada");
    const mine = await askForCode(uniqueEmail());
    const forged = `${withEmail(mine.totp, victim.email)}; ${mine.issued}`;
    const answer = await verify(forged, mine.code);
    expect(answer.status).toBe(302); // the strategy read the forged cookie and checked the code
    expect(answer.location).toBe("/sign-in");
    expect(await signedInAs(answer)).toBeNull();
    expect(answer.headers.getSetCookie().join()).not.toMatch(/tilldawn_session=[^;]/);
  });

  test("the same swap with one's own sign-in link does not sign in as the other person", async () => {
    const victim = await makeUser(db, "Ada");
    const mine = await askForCode(uniqueEmail());
    const url = new URL(mine.link);
    const forged = `${withEmail(mine.totp, victim.email)}; ${mine.issued}`;
    const answer = await callRoute(verifyRoute.loader, { path: `${url.pathname}${url.search}`, cookie: forged });
    expect(answer.status).toBe(302);
    expect(await signedInAs(answer)).toBeNull();
  });

  test("the other person's issued-code id with one's own strategy cookie and code does not sign in", async () => {
    const victim = uniqueEmail("ada");
    const theirs = await askForCode(victim);
    const mine = await askForCode(uniqueEmail());
    const answer = await verify(`${withEmail(mine.totp, victim)}; ${theirs.issued}`, mine.code);
    expect(await signedInAs(answer)).toBeNull();
  });

  test("without the issued-code cookie a valid code and strategy cookie sign nobody in", async () => {
    const mine = await askForCode(uniqueEmail());
    const answer = await verify(mine.totp, mine.code);
    expect(answer.status).toBe(400);
    expect(await signedInAs(answer)).toBeNull();
  });

  test("the untouched cookies and the right code still sign in, as the address the code was sent to", async () => {
    const email = uniqueEmail("sam");
    const mine = await askForCode(email);
    const answer = await verify(`${mine.totp}; ${mine.issued}`, mine.code);
    expect(await signedInAs(answer)).toBe(email);
    const [row] = await db.select().from(issuedSignInCodes).where(eq(issuedSignInCodes.email, email));
    expect(row!.usedAt).not.toBeNull();
    expect(row!.codeHash).not.toContain(mine.code);
  });
});

describe("Tries are counted per issued code on the server", () => {
  test("re-encoding the strategy cookie does not reset the count: after 5 wrong tries the right code is refused", async () => {
    const email = uniqueEmail();
    const mine = await askForCode(email);
    const wrong = mine.code === "000000" ? "111111" : "000000";
    for (let i = 0; i < 5; i++) expect((await verify(`${respelled(mine.totp, i)}; ${mine.issued}`, wrong)).status).toBe(302);
    const capped = await verify(`${mine.totp}; ${mine.issued}`, mine.code);
    expect(capped.status).toBe(429);
    expect(Number(capped.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(await signedInAs(capped)).toBeNull();
    const [row] = await db.select().from(issuedSignInCodes).where(eq(issuedSignInCodes.email, email));
    expect(row!.tries).toBe(5);
  });

  test("eighty wrong tries on one code are not accepted: the count stops at 5 and every later try is 429", async () => {
    const mine = await askForCode(uniqueEmail());
    const wrong = mine.code === "000000" ? "111111" : "000000";
    const statuses: number[] = [];
    for (let i = 0; i < 80; i++) statuses.push((await verify(`${mine.totp}; ${mine.issued}`, wrong)).status);
    expect(statuses.slice(0, 5).every((s) => s === 302)).toBe(true);
    expect(statuses.slice(5).every((s) => s === 429)).toBe(true);
  });
});

describe("Limits key on the connection, not on headers (finding 5)", () => {
  test("a new X-Forwarded-For on every request does not dodge the per-client limit; the 21st is 429 with Retry-After", async () => {
    const socket = ip();
    const answers: CallResult[] = [];
    for (let i = 0; i < 21; i++) {
      answers.push(
        await callRoute(signInRoute.action, {
          path: "/sign-in",
          form: { intent: "send", email: uniqueEmail(), redirectTo: "/" },
          headers: { "x-forwarded-for": `10.9.${i}.1`, "x-real-ip": `10.8.${i}.1` },
          context: { clientAddress: socket },
        }),
      );
    }
    expect(answers.slice(0, 20).every((a) => a.status === 302)).toBe(true);
    expect(answers[20]!.status).toBe(429);
    expect(Number(answers[20]!.headers.get("retry-after"))).toBeGreaterThan(0);
  });

  test("one busy client does not lock another out of sign-in", async () => {
    const busy = ip();
    for (let i = 0; i < 21; i++) {
      await callRoute(signInRoute.action, { path: "/sign-in", form: { intent: "send", email: uniqueEmail(), redirectTo: "/" }, context: { clientAddress: busy } });
    }
    const other = await callRoute(signInRoute.action, { path: "/sign-in", form: { intent: "send", email: uniqueEmail(), redirectTo: "/" }, context: { clientAddress: ip() } });
    expect(other.status).toBe(302);
  });
});

describe("After sign-in only same-origin paths are followed (finding 8)", () => {
  for (const target of ["/\t/evil.example", "/%09/evil.example", "/\n/evil.example", "//evil.example", "/\\evil.example", "https://evil.example/", "/\r\nSet-Cookie: x=1"]) {
    test(`redirectTo=${JSON.stringify(target)} never leaves the site and never fails`, async () => {
      const email = uniqueEmail("sam");
      const mine = await askForCode(email);
      const answer = await callRoute(signInRoute.action, {
        path: "/sign-in",
        cookie: `${mine.totp}; ${mine.issued}`,
        form: { intent: "verify", code: mine.code, redirectTo: target },
      });
      expect(answer.status).toBe(302);
      const location = answer.location!;
      expect(location).not.toMatch(/[\t\r\n]/);
      const landed = new URL(location, "http://tilldawn.test");
      expect(landed.origin).toBe("http://tilldawn.test");
      const inner = landed.searchParams.get("redirectTo");
      if (inner) expect(new URL(inner, "http://tilldawn.test").origin).toBe("http://tilldawn.test");
      expect(await signedInAs(answer)).toBe(email);
    });
  }
});
