// Local stand-ins for outside services, on loopback only. `npm start` runs this file; the
// browser tests' global setup imports the functions. One function per fake.
//
// SMTP: accepts every message on 127.0.0.1:SMTP_PORT (default 2525) and keeps it as a JSON
// file in DEV_OUTBOX_DIR (default .data/outbox), where the app's /dev/outbox page reads it.
import { mkdir, rename, writeFile } from "node:fs/promises";
import path from "node:path";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";
import type { OutboxEntry } from "../app/mail/outbox.server";

/** The stored shape is the one the /dev/outbox page reads. */
export type OutboxMessage = OutboxEntry;

export type RunningFake = { name: string; port: number; close: () => Promise<void> };

/** The SMTP fake. Messages land in `outboxDir` as `<time>-<id>.json`, written atomically. */
export async function startSmtpFake(options: { port: number; outboxDir: string; host?: string }): Promise<RunningFake> {
  const dir = path.resolve(options.outboxDir);
  await mkdir(dir, { recursive: true });
  const server = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (parsed) => {
          const id = crypto.randomUUID();
          const message: OutboxMessage = {
            id,
            receivedAt: new Date().toISOString(),
            from: parsed.from?.text ?? session.envelope.mailFrom?.toString() ?? "",
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: parsed.subject ?? "",
            text: parsed.text ?? "",
            html: typeof parsed.html === "string" ? parsed.html : "",
          };
          const file = path.join(dir, `${Date.now()}-${id}.json`);
          await writeFile(`${file}.tmp`, JSON.stringify(message));
          await rename(`${file}.tmp`, file);
          callback();
        })
        .catch((error: Error) => callback(error));
    },
  });
  const host = options.host ?? "127.0.0.1";
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, host, () => resolve());
  });
  const address = server.server.address();
  const port = typeof address === "object" && address ? address.port : options.port;
  return { name: "smtp", port, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}

/* ---------------------------------------------------------------- push (issue 13) */
//
// Push: a stand-in for a browser vendor's push service on 127.0.0.1:PUSH_FAKE_PORT (default
// 4310). A subscription's endpoint is http://127.0.0.1:PORT/push/<id>; every push POSTed there
// is kept as a JSON file in DEV_PUSH_DIR/messages (default .data/push), where /dev/push reads
// it. POST /subscriptions makes a subscription the fake holds the keys of (a P-256 key pair and
// an auth secret, as a browser makes them), so what arrives for it is decrypted (RFC 8291,
// aes128gcm) and stored in plain text too. GET /messages lists what arrived (?subscription=id).
// Ids starting "gone-" answer 410 (the subscription has expired); "flaky-" answer 500 to the
// first push and 201 after.
import { createECDH, randomBytes } from "node:crypto";
import { createServer } from "node:http";
import { readdir, readFile } from "node:fs/promises";
import * as ece from "http_ece";
import type { FakePush } from "../app/push/fake-inbox.server";

export type FakePushRecord = FakePush;

export async function startPushFake(options: { port: number; dir: string; host?: string }): Promise<RunningFake & { url: string }> {
  const dir = path.resolve(options.dir);
  const messages = path.join(dir, "messages");
  const keysFile = path.join(dir, "keys.json");
  await mkdir(messages, { recursive: true });
  let keys: Record<string, { privateKey: string; auth: string }> = {};
  try {
    keys = JSON.parse(await readFile(keysFile, "utf8")) as typeof keys;
  } catch {
    // first start
  }
  const flakySeen = new Set<string>();
  const host = options.host ?? "127.0.0.1";
  let base = "";
  const server = createServer((req, res) => {
    const url = new URL(req.url ?? "/", "http://fake");
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", () => {
      void (async () => {
        const body = Buffer.concat(chunks);
        const json = (status: number, value: unknown) => {
          res.writeHead(status, { "content-type": "application/json" });
          res.end(JSON.stringify(value));
        };
        const push = /^\/push\/([A-Za-z0-9_-]{1,80})$/.exec(url.pathname);
        if (req.method === "POST" && push) {
          const id = push[1]!;
          if (id.startsWith("gone-")) return json(410, { error: "subscription expired" });
          if (id.startsWith("flaky-") && !flakySeen.has(id)) {
            flakySeen.add(id);
            return json(500, { error: "try again" });
          }
          let decrypted: string | null = null;
          const k = keys[id];
          if (k) {
            try {
              const ecdh = createECDH("prime256v1");
              ecdh.setPrivateKey(Buffer.from(k.privateKey, "base64url"));
              decrypted = ece.decrypt(body, { version: "aes128gcm", privateKey: ecdh, authSecret: k.auth }).toString("utf8");
            } catch (error) {
              decrypted = `(could not decrypt: ${(error as Error).message})`;
            }
          }
          const record: FakePushRecord = {
            id: crypto.randomUUID(),
            subscriptionId: id,
            receivedAt: new Date().toISOString(),
            encoding: String(req.headers["content-encoding"] ?? ""),
            ttl: (req.headers["ttl"] as string | undefined) ?? null,
            urgency: (req.headers["urgency"] as string | undefined) ?? null,
            authorization: req.headers.authorization ?? null,
            bytes: body.length,
            bodyBase64: body.toString("base64"),
            decrypted,
          };
          const file = path.join(messages, `${Date.now()}-${record.id}.json`);
          await writeFile(`${file}.tmp`, JSON.stringify(record));
          await rename(`${file}.tmp`, file);
          res.writeHead(201, { location: `/messages/${record.id}` });
          return res.end();
        }
        if (req.method === "POST" && url.pathname === "/subscriptions") {
          const id = `fake-${randomBytes(9).toString("base64url")}`;
          const ecdh = createECDH("prime256v1");
          ecdh.generateKeys();
          const auth = randomBytes(16).toString("base64url");
          keys[id] = { privateKey: ecdh.getPrivateKey().toString("base64url"), auth };
          await writeFile(keysFile, JSON.stringify(keys));
          return json(201, { endpoint: `${base}/push/${id}`, expirationTime: null, keys: { p256dh: ecdh.getPublicKey().toString("base64url"), auth } });
        }
        if (req.method === "GET" && url.pathname === "/messages") {
          const only = url.searchParams.get("subscription");
          const names = (await readdir(messages)).filter((n) => n.endsWith(".json")).sort();
          const list: FakePushRecord[] = [];
          for (const n of names) {
            const r = JSON.parse(await readFile(path.join(messages, n), "utf8")) as FakePushRecord;
            if (!only || r.subscriptionId === only) list.push(r);
          }
          return json(200, list);
        }
        json(404, { error: "not here" });
      })().catch((error: Error) => {
        res.writeHead(500);
        res.end(error.message);
      });
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, host, () => resolve());
  });
  const address = server.address();
  const port = typeof address === "object" && address ? address.port : options.port;
  base = `http://${host}:${port}`;
  return { name: "push", port, url: base, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}

/* ---------------------------------------------------------------- end of push */

/* ------------------------------------------------------------------ S3 (photos)
 * An S3-compatible store on 127.0.0.1:PHOTOS_S3_PORT (default 4569) with one bucket, its objects
 * in PHOTOS_S3_DIR (default .data/s3). Path-style addressing; credentials S3RVER / S3RVER.
 */
export async function startS3Fake(options: { port: number; directory: string; bucket?: string; host?: string }): Promise<RunningFake> {
  const { default: S3rver } = await import("s3rver");
  const { FAKE_S3_BUCKET } = await import("../app/env.server");
  const directory = path.resolve(options.directory);
  await mkdir(directory, { recursive: true });
  const server = new S3rver({
    address: options.host ?? "127.0.0.1",
    port: options.port,
    directory,
    silent: true,
    vhostBuckets: false,
    configureBuckets: [{ name: options.bucket ?? FAKE_S3_BUCKET }],
  });
  const address = await server.run();
  return { name: "s3", port: address.port, close: () => server.close() };
}

/** Starts every fake from the environment (as `npm start` does). */
export async function startFakes(env: NodeJS.ProcessEnv = process.env): Promise<RunningFake[]> {
  const fakes: RunningFake[] = [];
  if (!env.SMTP_URL) {
    fakes.push(await startSmtpFake({ port: Number(env.SMTP_PORT ?? 2525), outboxDir: env.DEV_OUTBOX_DIR ?? ".data/outbox" }));
  }
  if (!env.VAPID_PUBLIC_KEY) {
    fakes.push(await startPushFake({ port: Number(env.PUSH_FAKE_PORT ?? 4310), dir: env.DEV_PUSH_DIR ?? ".data/push" }));
  }
  if (!env.PHOTOS_S3_BUCKET && !env.PHOTOS_S3_ENDPOINT) {
    fakes.push(await startS3Fake({ port: Number(env.PHOTOS_S3_PORT ?? 4569), directory: env.PHOTOS_S3_DIR ?? ".data/s3" }));
  }
  return fakes;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  try {
    const fakes = await startFakes();
    for (const fake of fakes) console.log(`[fakes] ${fake.name} listening on 127.0.0.1:${fake.port}`);
    const stop = async () => {
      await Promise.all(fakes.map((f) => f.close()));
      process.exit(0);
    };
    process.on("SIGTERM", stop);
    process.on("SIGINT", stop);
  } catch (error) {
    console.error(`[fakes] could not start: ${(error as Error).message}`);
    process.exit(1);
  }
}
