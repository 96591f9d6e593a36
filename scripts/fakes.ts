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
