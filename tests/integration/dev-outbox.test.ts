import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, afterEach, beforeAll, describe, expect, test, vi } from "vitest";
import { startSmtpFake, type RunningFake } from "../../scripts/fakes";
import { callRoute } from "./auth";

let fake: RunningFake;
let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), "tilldawn-outbox-"));
  fake = await startSmtpFake({ port: 0, outboxDir: dir });
});
afterAll(async () => {
  await fake.close();
  await rm(dir, { recursive: true, force: true });
});
afterEach(() => {
  vi.unstubAllEnvs();
  vi.resetModules();
});

/** Fresh modules, so the environment is read again with the stubs. */
async function freshModules() {
  vi.resetModules();
  return {
    mailer: await import("~/mail/mailer.server"),
    templates: await import("~/mail/templates"),
    outboxRoute: await import("~/routes/dev.outbox"),
  };
}

describe("The local mail fake and the development outbox", () => {
  test("a sign-in e-mail sent over SMTP to the fake shows on /dev/outbox with its code and link, text and HTML kept", async () => {
    vi.stubEnv("SMTP_PORT", String(fake.port));
    vi.stubEnv("DEV_OUTBOX_DIR", dir);
    const { mailer, templates, outboxRoute } = await freshModules();
    await mailer.sendMail(
      templates.signInCodeMail({ to: "ada@juniper.example", code: "482913", magicLink: "http://127.0.0.1:3000/auth/verify?t=abc", validMinutes: 10 }),
    );
    const page = await callRoute(outboxRoute.loader, { path: "/dev/outbox" });
    expect(page.status).toBe(200);
    const [message] = (page.body as { messages: Array<{ to: string[]; subject: string; code: string; links: string[]; text: string; html: string }> }).messages;
    expect(message).toMatchObject({
      to: ["ada@juniper.example"],
      subject: "Your Tilldawn sign-in code: 482913",
      code: "482913",
      links: ["http://127.0.0.1:3000/auth/verify?t=abc"],
    });
    expect(message!.text).toContain("Your sign-in code is 482913");
    expect(message!.html).toContain("482913");
  });

  test("with real SMTP settings the outbox page answers 404", async () => {
    vi.stubEnv("SMTP_URL", "smtp://mailer.example.net:587");
    const { outboxRoute } = await freshModules();
    const page = await callRoute(outboxRoute.loader, { path: "/dev/outbox" });
    expect(page.status).toBe(404);
  });

  test("when the mail server cannot be reached, asking for a code answers 503 and keeps the address", async () => {
    vi.stubEnv("SMTP_PORT", "9");
    await freshModules();
    const signIn = await import("~/routes/sign-in");
    const res = await callRoute(signIn.action, {
      path: "/sign-in",
      form: { intent: "send", email: `unreachable-${crypto.randomUUID().slice(0, 6)}@example.net` },
      headers: { "x-forwarded-for": `203.0.113.${Math.floor(Math.random() * 200)}` },
    });
    expect(res.status).toBe(503);
    expect(res.body).toMatchObject({ error: expect.stringMatching(/could not be sent/) });
  });
});
