/**
 * Sign-in with an e-mailed one-time code and magic link (remix-auth + remix-auth-totp).
 *
 * The strategy keeps the code encrypted in its own `_totp` cookie (10 minutes). Around it we
 * add what it does not do for us: rate limits on requesting codes (per e-mail address and per
 * client address, in PostgreSQL), a server row per issued code that decides who signs in and
 * caps the tries (issued-codes.server.ts), accounts created on first sign-in, and our own
 * session (session.server.ts). Nothing in the browser's cookies decides the address: the
 * strategy's verify callback signs in only an address the issued-code row approved.
 */
import { eq, sql } from "drizzle-orm";
import { data, redirect } from "react-router";
import { Authenticator } from "remix-auth";
import { TOTPStrategy } from "remix-auth-totp";
import { z } from "zod";
import { getDb, type Db } from "~/db/db.server";
import { users } from "~/db/schema";
import { emailSchema } from "~/schemas/account";
import { appOrigin, getEnv } from "~/env.server";
import { clientAddress } from "~/lib/rate-limit.server";
import { MailError, sendMail } from "~/mail/mailer.server";
import { signInCodeMail } from "~/mail/templates";
import { CODE_VALID_MINUTES, MAX_CODE_ATTEMPTS } from "./constants";
import {
  checkIssuedCode,
  clearSignInCookie,
  codeFromMagicLinkToken,
  readIssuedCodeId,
  recordIssuedCode,
  signInCookie,
} from "./issued-codes.server";
import { CODE_REQUEST_WINDOW_S, hitLimit, pruneSignInRecords } from "./limits.server";

export { CODE_VALID_MINUTES };
import { createSession, deleteExpiredSessions, safeRedirect } from "./session.server";

export const MAGIC_LINK_PATH = "/auth/verify";
/** The form field (server-made requests only) that hands sendTOTP the issued code's id. */
const ISSUED_FIELD = "issuedCodeId";
/**
 * Sign-ins the issued-code check approved: a one-time random key (sent to the strategy in a
 * header of the server-made request; remix-auth copies the request) → the address.
 */
const approved = new Map<string, string>();
const APPROVAL_HEADER = "x-tilldawn-sign-in-approval";
const CODE_COOKIE = "_totp";

export const codeSchema = z
  .string({ error: "Enter the code from the e-mail." })
  .transform((s) => s.replace(/\s+/g, ""))
  .pipe(z.string().regex(/^\d{6}$/, "The code is the 6 digits from the e-mail."));

export const messages = {
  invalidCode: "That code is not right. Check the e-mail and try again.",
  expiredCode: `That code has expired (codes work for ${CODE_VALID_MINUTES} minutes). Ask for a new one.`,
  tooManyTries: `Too many wrong tries for this code (the limit is ${MAX_CODE_ATTEMPTS}). Ask for a new code.`,
  usedCode: "That code has already been used. Ask for a new one.",
  noCode: "There is no code waiting in this browser. Ask for a new one here.",
};

/** What the strategy keeps in its cookie: the address, the encrypted code and the last error. */
export function readCodeCookie(request: Request): { email: string | null; jwe: string | null; error: string | null } {
  const header = request.headers.get("cookie") ?? "";
  const raw = header
    .split(/;\s*/)
    .find((part) => part.startsWith(`${CODE_COOKIE}=`))
    ?.slice(CODE_COOKIE.length + 1);
  if (!raw) return { email: null, jwe: null, error: null };
  const params = new URLSearchParams(raw.replace(/^"|"$/g, ""));
  let jwe: string | null = null;
  try {
    const totp = JSON.parse(params.get("totp") ?? "null") as { jwe?: unknown } | null;
    jwe = typeof totp?.jwe === "string" ? totp.jwe : null;
  } catch {
    jwe = null;
  }
  return { email: params.get("email") || null, jwe, error: params.get("error") || null };
}

let authenticator: Authenticator<void> | undefined;

function getAuthenticator(): Authenticator<void> {
  if (authenticator) return authenticator;
  const env = getEnv();
  const strategy = new TOTPStrategy<void>(
    {
      secret: env.TOTP_SECRET,
      magicLinkPath: MAGIC_LINK_PATH,
      emailSentRedirect: "/sign-in",
      successRedirect: "/",
      failureRedirect: "/sign-in",
      cookieOptions: {
        maxAge: CODE_VALID_MINUTES * 60,
        ...(env.APP_URL?.startsWith("https:") ? { secure: true as const } : {}),
      },
      totpGeneration: { period: CODE_VALID_MINUTES * 60, digits: 6, charSet: "0123456789", maxAttempts: MAX_CODE_ATTEMPTS },
      customErrors: {
        invalidTotp: messages.invalidCode,
        expiredTotp: messages.expiredCode,
        rateLimitExceeded: messages.tooManyTries,
        missingSessionEmail: messages.noCode,
        missingSessionTotp: messages.noCode,
      },
      validateEmail: async (email) => emailSchema.safeParse(email).success,
      sendTOTP: async ({ email, code, magicLink, formData }) => {
        const issuedId = formData.get(ISSUED_FIELD);
        if (typeof issuedId !== "string") throw new Error("a sign-in code was asked for without an issued-code id");
        // Links point at APP_URL (the strategy builds them from the request, which behind a
        // proxy is the internal address), and carry where to go after signing in.
        const link = new URL(magicLink);
        const target = new URL(`${link.pathname}${link.search}`, appOrigin());
        const redirectTo = safeRedirect(formData.get("redirectTo"), "");
        if (redirectTo) target.searchParams.set("redirectTo", redirectTo);
        await recordIssuedCode(getDb(), issuedId, email, code);
        try {
          await sendMail(signInCodeMail({ to: email, code, magicLink: target.toString(), validMinutes: CODE_VALID_MINUTES }));
        } catch (error) {
          // The strategy turns a thrown Error into its failure redirect (losing the typed
          // address); a thrown Response comes back to requestCode as is.
          if (error instanceof MailError) throw new Response(null, { status: 503 });
          throw error;
        }
      },
    },
    async ({ formData, request }) => {
      // The strategy ignores what verify returns: we end the sign-in by throwing our redirect,
      // carrying the session cookie. The strategy appends its own cookie (now cleared).
      // The address is the one the issued-code row approved for this very request, never the
      // strategy cookie's: without an approval, nobody signs in.
      const key = request.headers.get(APPROVAL_HEADER);
      const email = key ? approved.get(key) : undefined;
      if (!key || !email) throw new Error(messages.invalidCode);
      approved.delete(key);
      const db = getDb();
      // Housekeeping rides along with sign-ins: expired sessions, day-old code rows and buckets.
      await Promise.all([deleteExpiredSessions(db), pruneSignInRecords(db)]);
      const { user, created } = await findOrCreateUser(db, email);
      const session = await createSession(db, user.id, request.headers.get("user-agent") ?? "");
      const wanted = safeRedirect(formData?.get("redirectTo") ?? new URL(request.url).searchParams.get("redirectTo"));
      const to = created || !user.name ? `/welcome?${new URLSearchParams({ redirectTo: wanted })}` : wanted;
      const headers = new Headers();
      headers.append("Set-Cookie", session.setCookie);
      headers.append("Set-Cookie", await clearSignInCookie());
      throw redirect(to, { headers });
    },
  );
  authenticator = new Authenticator<void>().use(strategy);
  return authenticator;
}

/** Finds the account for an address (any letter case) or creates it on first sign-in. */
export async function findOrCreateUser(db: Db, email: string) {
  const normalized = email.trim().toLowerCase();
  const [existing] = await db.select().from(users).where(eq(sql`lower(${users.email})`, normalized));
  if (existing) return { user: existing, created: false };
  const [inserted] = await db.insert(users).values({ email: normalized }).onConflictDoNothing().returning();
  if (inserted) return { user: inserted, created: true };
  const [raced] = await db.select().from(users).where(eq(sql`lower(${users.email})`, normalized));
  if (!raced) throw new Error("user vanished while signing in");
  return { user: raced, created: false };
}

/** Runs the strategy and hands back the Response it throws (it always throws one). */
async function runStrategy(request: Request): Promise<Response> {
  try {
    await getAuthenticator().authenticate("TOTP", request);
  } catch (thrown) {
    if (thrown instanceof Response) return thrown;
    throw thrown;
  }
  throw new Error("the sign-in strategy returned without an answer");
}

function formRequest(request: Request, fields: Record<string, string>): Request {
  const headers = new Headers();
  for (const name of ["cookie", "user-agent", "origin"]) {
    const value = request.headers.get(name);
    if (value) headers.set(name, value);
  }
  headers.set("content-type", "application/x-www-form-urlencoded");
  return new Request(request.url, { method: "POST", headers, body: new URLSearchParams(fields) });
}

export type SignInFormResult = {
  step: "email" | "code";
  values: { email: string; redirectTo: string };
  error?: string;
  fieldErrors?: { email?: string; code?: string };
  retryAfterS?: number;
};

function tooMany(values: SignInFormResult["values"], step: SignInFormResult["step"], retryAfterS: number, what: string) {
  const minutes = Math.ceil(retryAfterS / 60);
  return data<SignInFormResult>(
    {
      step,
      values,
      retryAfterS,
      error: `${what} Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.`,
    },
    { status: 429, headers: { "Retry-After": String(retryAfterS) } },
  );
}

/**
 * Sends a code (new or again) to `email`, within the limits. Answers the strategy's redirect
 * (with its cookie), or 400/429/503 with the form values.
 */
export async function requestCode(
  request: Request,
  input: { email: unknown; redirectTo: string },
  context: unknown = {},
  db: Db = getDb(),
) {
  const env = getEnv();
  const typed = typeof input.email === "string" ? input.email : "";
  const values = { email: typed, redirectTo: input.redirectTo };
  const parsed = emailSchema.safeParse(typed);
  if (!parsed.success) {
    return data<SignInFormResult>(
      { step: "email", values, fieldErrors: { email: parsed.error.issues[0]?.message } },
      { status: 400 },
    );
  }
  const email = parsed.data;
  const byAddress = await hitLimit(db, `sign-in-code:ip:${clientAddress(context)}`, env.SIGN_IN_CODES_PER_ADDRESS, CODE_REQUEST_WINDOW_S);
  if (!byAddress.ok) return tooMany(values, "email", byAddress.retryAfterS, "Too many sign-in codes were asked for from this network.");
  const byEmail = await hitLimit(db, `sign-in-code:email:${email}`, env.SIGN_IN_CODES_PER_EMAIL, CODE_REQUEST_WINDOW_S);
  if (!byEmail.ok) return tooMany(values, "email", byEmail.retryAfterS, `Too many sign-in codes were sent to ${email}.`);
  const issuedId = crypto.randomUUID();
  const answer = await runStrategy(formRequest(request, { email, redirectTo: input.redirectTo, [ISSUED_FIELD]: issuedId }));
  if (answer.status === 503) {
    return data<SignInFormResult>(
      { step: "email", values, error: "The e-mail with your code could not be sent. Try again in a moment." },
      { status: 503 },
    );
  }
  const sent = withRedirectTo(answer, input.redirectTo);
  const headers = new Headers(sent.headers);
  headers.append("Set-Cookie", await signInCookie().serialize(issuedId));
  return new Response(null, { status: sent.status, headers });
}

/** Checks a typed code (or a magic link, when `code` is null) within the per-code cap. */
export async function verifyCode(request: Request, input: { code: string | null; redirectTo: string }, db: Db = getDb()) {
  const cookie = readCodeCookie(request);
  const values = { email: cookie.email ?? "", redirectTo: input.redirectTo };
  if (input.code !== null) {
    const parsed = codeSchema.safeParse(input.code);
    if (!parsed.success) {
      return data<SignInFormResult>({ step: "code", values, fieldErrors: { code: parsed.error.issues[0]?.message } }, { status: 400 });
    }
    input = { ...input, code: parsed.data };
  }
  if (!cookie.email || !cookie.jwe) {
    return data<SignInFormResult>({ step: "email", values, error: messages.noCode }, { status: 400 });
  }
  const typed = input.code ?? codeFromMagicLinkToken(new URL(request.url).searchParams.get("t"));
  const check = await checkIssuedCode(db, await readIssuedCodeId(request), typed, cookie.email);
  if (!check.ok) {
    if (check.reason === "unknown") return data<SignInFormResult>({ step: "email", values, error: messages.noCode }, { status: 400 });
    if (check.reason === "used") return data<SignInFormResult>({ step: "code", values, error: messages.usedCode }, { status: 400 });
    if (check.reason === "too_many") {
      return data<SignInFormResult>(
        { step: "code", values, error: messages.tooManyTries, retryAfterS: check.retryAfterS },
        { status: 429, headers: { "Retry-After": String(check.retryAfterS) } },
      );
    }
    // Wrong or expired: the strategy runs on and answers its own failure (it says which);
    // its verify callback signs nobody in, because this request was not approved.
  }
  const strategyRequest =
    input.code === null ? new Request(request.url, { headers: request.headers }) : formRequest(request, { code: input.code, redirectTo: input.redirectTo });
  strategyRequest.headers.delete(APPROVAL_HEADER);
  const key = check.ok ? crypto.randomUUID() : null;
  if (key && check.ok) {
    approved.set(key, check.email);
    strategyRequest.headers.set(APPROVAL_HEADER, key);
  }
  try {
    return withRedirectTo(await runStrategy(strategyRequest), input.redirectTo);
  } finally {
    if (key) approved.delete(key);
  }
}

/** The strategy redirects to bare /sign-in; keep where the person was going. */
function withRedirectTo(answer: Response, redirectTo: string): Response {
  const location = answer.headers.get("location");
  if (location !== "/sign-in" || redirectTo === "/") return answer;
  const headers = new Headers(answer.headers);
  headers.set("location", `/sign-in?${new URLSearchParams({ redirectTo })}`);
  return new Response(null, { status: answer.status, headers });
}

/** "Use another address": forget the code in progress (both cookies) and show the address step. */
export async function restartSignIn(redirectTo: string) {
  return redirect(`/sign-in?${new URLSearchParams({ redirectTo })}`, {
    headers: [
      ["Set-Cookie", `${CODE_COOKIE}=; Path=/; Max-Age=0; HttpOnly; SameSite=Lax`],
      ["Set-Cookie", await clearSignInCookie()],
    ],
  });
}
