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
    const page = await callRoute(outboxRoute.loader, { path: "/dev/outbox", context: { clientAddress: "127.0.0.1" } });
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
    const page = await callRoute(outboxRoute.loader, { path: "/dev/outbox", context: { clientAddress: "127.0.0.1" } });
    expect(page.status).toBe(404);
  });

  test("the outbox answers only loopback clients, whatever their headers say (finding 7)", async () => {
    vi.stubEnv("DEV_OUTBOX_DIR", dir);
    const { outboxRoute } = await freshModules();
    for (const clientAddress of ["192.168.1.20", "203.0.113.7", "::ffff:10.0.0.2", undefined]) {
      const page = await callRoute(outboxRoute.loader, {
        path: "/dev/outbox",
        headers: { "x-forwarded-for": "127.0.0.1", "x-real-ip": "127.0.0.1", host: "127.0.0.1" },
        context: { clientAddress },
      });
      expect(page.status, String(clientAddress)).toBe(404);
    }
    for (const clientAddress of ["127.0.0.1", "::1", "::ffff:127.0.0.1"]) {
      expect((await callRoute(outboxRoute.loader, { path: "/dev/outbox", context: { clientAddress } })).status).toBe(200);
    }
  });

  test("when the mail server cannot be reached, asking for a code answers 503 and keeps the address", async () => {
    vi.stubEnv("SMTP_PORT", "9");
    await freshModules();
    const signIn = await import("~/routes/sign-in");
    const res = await callRoute(signIn.action, {
      path: "/sign-in",
      form: { intent: "send", email: `unreachable-${crypto.randomUUID().slice(0, 6)}@example.net` },
      context: { clientAddress: `203.0.113.${Math.floor(Math.random() * 200)}` },
    });
    expect(res.status).toBe(503);
    expect(res.body).toMatchObject({ error: expect.stringMatching(/could not be sent/) });
  });
});
