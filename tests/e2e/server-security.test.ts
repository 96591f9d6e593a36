/**
 * Issue 9 against the real server (scripts/serve.mjs serving the production build):
 * - finding 7: the Host allowlist (APP_URL's host plus loopback on a local run);
 * - finding 11: security headers on every route of app/routes.ts (walked from the route list);
 * - finding 6: signing in works with APP_URL=https://… behind a TLS-terminating proxy
 *   (a local one with a self-signed certificate, loopback only; ports SEC_TLS_* or 4102-4104).
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtemp, rm } from "node:fs/promises";
import https from "node:https";
import http from "node:http";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { generate } from "selfsigned";
import { rigMembers } from "~/db/schema";
import { createDb } from "~/db/db.server";
import { createSession } from "~/auth/session.server";
import { createInvite } from "~/repos/members.server";
import { createRig } from "~/repos/rigs.server";
import { readOutbox, extractSignIn } from "~/mail/outbox.server";
import routes from "~/routes";
import { startSmtpFake } from "../../scripts/fakes";
import { juniperModel } from "../fixtures/juniper";
import { makeUser } from "../integration/auth";
import { baseUrl } from "./browser";

const root = fileURLToPath(new URL("../..", import.meta.url));
const { db, pool } = createDb(process.env.DATABASE_URL ?? "postgres://tilldawn@127.0.0.1:54339/tilldawn_test", 2);
afterAll(() => pool.end());

type RouteNode = { file: string; path?: string; index?: boolean; children?: RouteNode[] };
function flatten(nodes: RouteNode[], parent = ""): Array<{ file: string; path: string }> {
  return nodes.flatMap((node) => {
    const full = [parent, node.path ?? ""].filter(Boolean).join("/");
    return [{ file: node.file, path: `/${full}` }, ...flatten(node.children ?? [], full)];
  });
}

describe("Host allowlist (finding 7)", () => {
  const port = new URL(baseUrl()).port;
  for (const host of ["evil.example", `evil.example:${port}`, "127.0.0.1.nip.example", `192.168.1.10:${port}`]) {
    test(`Host ${JSON.stringify(host)} is refused with 421 before the app runs`, async () => {
      const status = await rawGet("127.0.0.1", Number(port), "/api/health", host);
      expect(status).toBe(421);
    });
  }
  test("no Host at all is refused (Node answers HTTP/1.1 without Host with 400 itself)", async () => {
    expect([400, 421]).toContain(await rawGet("127.0.0.1", Number(port), "/api/health", ""));
  });
  for (const host of [`127.0.0.1:${port}`, `localhost:${port}`]) {
    test(`Host ${host} (APP_URL or loopback on a local run) is served`, async () => {
      expect(await rawGet("127.0.0.1", Number(port), "/api/health", host)).toBe(200);
    });
  }
});

/** A GET with exactly this Host header (fetch would not let us set it). */
function rawGet(hostname: string, port: number, pathname: string, host: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = http.request({ hostname, port, path: pathname, method: "GET", setHost: false, headers: host ? { host } : {} }, (res) => {
      res.resume();
      resolve(res.statusCode ?? 0);
    });
    req.on("error", reject);
    req.end();
  });
}

describe("Security headers on every route (finding 11)", () => {
  let cookie: string;
  let rigId: string;
  let token: string;
  beforeAll(async () => {
    const owner = await makeUser(db, "Ada");
    const { rig } = await createRig(db, { name: "Header van", ownerId: owner.id, document: juniperModel });
    rigId = rig.id;
    const guest = await makeUser(db, "Noor");
    await db.insert(rigMembers).values({ rigId, userId: guest.id, role: "guest" });
    token = (await createInvite(db, { rigId, email: `h-${crypto.randomUUID().slice(0, 6)}@juniper.example`, role: "crew", invitedBy: owner.id })).token;
    cookie = (await createSession(db, owner.id, "headers")).setCookie.split(";")[0]!;
  });

  const fill = (p: string) =>
    p
      .replace(":rigId", rigId)
      .replace(":token", token)
      .replace(/:(\w+)/g, () => crypto.randomUUID())
      .replace("/*", "/no/such/page");

  for (const route of flatten(routes as RouteNode[])) {
    test(`${route.path} (${route.file}): nosniff, Referrer-Policy, frame-ancestors 'none', X-Frame-Options; no-store when signed in`, async () => {
      for (const signedIn of [false, true]) {
        const res = await fetch(new URL(fill(route.path), baseUrl()), { headers: signedIn ? { cookie } : {}, redirect: "manual" });
        const body = await res.text();
        const h = res.headers;
        const where = `${route.path} ${signedIn ? "signed in" : "signed out"} (${res.status})`;
        expect(h.get("x-content-type-options"), where).toBe("nosniff");
        expect(h.get("referrer-policy"), where).toBe("same-origin");
        expect(h.get("x-frame-options"), where).toBe("DENY");
        const csp = h.get("content-security-policy") ?? "";
        expect(csp, where).toContain("frame-ancestors 'none'");
        expect(csp, where).not.toContain("unsafe-eval");
        if ((h.get("content-type") ?? "").includes("text/html")) {
          const nonce = /script-src 'self' 'nonce-([^']+)'/.exec(csp)?.[1];
          expect(nonce, `${where}: a document's CSP carries a nonce`).toBeTruthy();
          expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
          // Every inline script the framework emits carries this document's nonce.
          for (const tag of body.match(/<script\b[^>]*>/g) ?? []) expect(tag, where).toContain(`nonce="${nonce}"`);
        }
        // Pages for a signed-in person are personal; API answers say how they may be kept
        // (personal ones private, no-store: see the next tests).
        if (signedIn && !route.path.startsWith("/api/")) expect(h.get("cache-control"), where).toBe("private, no-store");
        if (route.path.startsWith("/api/")) expect(h.get("cache-control"), where).toBeTruthy();
      }
    });
  }

  test("static files keep their caching; the worker script carries no CSP of its own; the offline page has no inline script", async () => {
    const sw = await fetch(new URL("/sw.js", baseUrl()));
    expect(sw.headers.get("content-security-policy")).toBeNull();
    expect(sw.headers.get("x-content-type-options")).toBe("nosniff");
    const offline = await fetch(new URL("/offline.html", baseUrl()));
    expect(offline.headers.get("content-security-policy")).toContain("script-src 'self'");
    expect(await offline.text()).not.toMatch(/<script>(?!<\/script>)/);
    const manifest = await fetch(new URL("/manifest.webmanifest", baseUrl()));
    expect(manifest.headers.get("cache-control")).toMatch(/max-age/);
  });

  test("API answers with personal data say private, no-store", async () => {
    for (const p of [`/api/rigs/${rigId}/state`, `/api/rigs/${rigId}/model`, `/api/rigs/${rigId}/readings`, "/api/v1/me"]) {
      const res = await fetch(new URL(p, baseUrl()), { headers: { cookie } });
      expect(res.status, p).toBe(200);
      expect(res.headers.get("cache-control"), p).toMatch(/private, no-store/);
    }
  });
});

describe("Signing in behind a TLS-terminating proxy with APP_URL=https://… (finding 6)", () => {
  const appPort = Number(process.env.SEC_TLS_APP_PORT ?? 4102);
  const proxyPort = Number(process.env.SEC_TLS_PROXY_PORT ?? 4103);
  const smtpPort = Number(process.env.SEC_TLS_SMTP_PORT ?? 4104);
  const publicUrl = `https://127.0.0.1:${proxyPort}`;
  let server: ChildProcess | undefined;
  let proxy: https.Server | undefined;
  let smtp: { close: () => Promise<void> } | undefined;
  let outboxDir = "";
  let ca = "";

  beforeAll(async () => {
    outboxDir = await mkdtemp(path.join(tmpdir(), "tilldawn-tls-outbox-"));
    smtp = await startSmtpFake({ port: smtpPort, outboxDir });
    const pems = await generate([{ name: "commonName", value: "127.0.0.1" }], {
      days: 1,
      extensions: [{ name: "subjectAltName", altNames: [{ type: 7, ip: "127.0.0.1" }] }],
    } as Parameters<typeof generate>[1]);
    ca = pems.cert;
    server = spawn(process.execPath, [`${root}scripts/serve.mjs`, "./build/server/index.js"], {
      cwd: root,
      env: { ...process.env, NODE_ENV: "production", HOST: "127.0.0.1", PORT: String(appPort), APP_URL: publicUrl, SMTP_PORT: String(smtpPort), DEV_OUTBOX_DIR: outboxDir },
      stdio: ["ignore", "ignore", "inherit"],
    });
    // The proxy: TLS on loopback, plain HTTP to the app, Host kept (as a proxy is set up to do).
    proxy = https.createServer({ key: pems.private, cert: pems.cert }, (req, res) => {
      const upstream = http.request(
        { hostname: "127.0.0.1", port: appPort, path: req.url, method: req.method, headers: req.headers, setHost: false },
        (answer) => {
          res.writeHead(answer.statusCode ?? 502, answer.headers);
          answer.pipe(res);
        },
      );
      upstream.on("error", () => res.writeHead(502).end());
      req.pipe(upstream);
    });
    await new Promise<void>((resolve) => proxy!.listen(proxyPort, "127.0.0.1", resolve));
    for (let i = 0; i < 300; i++) {
      try {
        if ((await call("GET", "/api/health")).status === 200) return;
      } catch {
        /* not up yet */
      }
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error("the app behind the TLS proxy did not start");
  }, 60_000);

  afterAll(async () => {
    server?.kill("SIGTERM");
    await new Promise<void>((resolve) => (proxy ? proxy.close(() => resolve()) : resolve()));
    await smtp?.close();
    await rm(outboxDir, { recursive: true, force: true });
  });

  type Answer = { status: number; headers: http.IncomingHttpHeaders; body: string };
  function call(method: string, pathname: string, opts: { cookie?: string; form?: Record<string, string> } = {}): Promise<Answer> {
    return new Promise((resolve, reject) => {
      const body = opts.form ? new URLSearchParams(opts.form).toString() : undefined;
      const headers: Record<string, string> = { host: `127.0.0.1:${proxyPort}` };
      if (opts.cookie) headers.cookie = opts.cookie;
      if (body) {
        headers["content-type"] = "application/x-www-form-urlencoded";
        headers["content-length"] = String(Buffer.byteLength(body));
        headers.origin = publicUrl;
        headers["sec-fetch-site"] = "same-origin";
      }
      const req = https.request({ hostname: "127.0.0.1", port: proxyPort, path: pathname, method, headers, ca }, (res) => {
        let text = "";
        res.setEncoding("utf8");
        res.on("data", (c: string) => (text += c));
        res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: text }));
      });
      req.on("error", reject);
      req.end(body);
    });
  }
  const cookiesOf = (a: Answer) => (a.headers["set-cookie"] ?? []).map((c) => c.split(";")[0]!).filter((c) => !/=$/.test(c));

  test("a code asked for and typed through https signs in; cookies are Secure and HSTS is sent", async () => {
    const email = `tls-${crypto.randomUUID().slice(0, 8)}@juniper.example`;
    const page = await call("GET", "/sign-in");
    expect(page.status).toBe(200);
    expect(page.headers["strict-transport-security"]).toMatch(/max-age=\d+/);

    const asked = await call("POST", "/sign-in", { form: { intent: "send", email, redirectTo: "/" } });
    expect(asked.status, asked.body.slice(0, 200)).toBe(302);
    for (const line of asked.headers["set-cookie"] ?? []) expect(line).toMatch(/;\s*Secure/i);
    let code: string | null = null;
    for (let i = 0; i < 50 && !code; i++) {
      const mail = (await readOutbox(10, outboxDir)).find((m) => m.to.includes(email));
      code = mail ? extractSignIn(mail.text).code : null;
      if (mail) expect(mail.text).toContain(`${publicUrl}/auth/verify?t=`);
      if (!code) await new Promise((r) => setTimeout(r, 100));
    }
    expect(code).toMatch(/^\d{6}$/);

    const signedIn = await call("POST", "/sign-in", { cookie: cookiesOf(asked).join("; "), form: { intent: "verify", code: code!, redirectTo: "/" } });
    expect(signedIn.status, signedIn.body.slice(0, 200)).toBe(302);
    const session = cookiesOf(signedIn).find((c) => c.startsWith("tilldawn_session="));
    expect(session).toBeTruthy();
    expect((signedIn.headers["set-cookie"] ?? []).find((c) => c.startsWith("tilldawn_session="))).toMatch(/;\s*Secure/i);
    const me = await call("GET", "/api/v1/me", { cookie: session! });
    expect(me.status).toBe(200);
    expect(JSON.parse(me.body)).toMatchObject({ user: { email } });
  });
});
