// Starts the production build against the test database for the browser tests, with the
// local fakes (scripts/fakes.ts) it talks to: the SMTP fake whose messages /dev/outbox lists.
import { spawn, type ChildProcess } from "node:child_process";
import { rm } from "node:fs/promises";
import { fileURLToPath } from "node:url";
import { startPushFake, startS3Fake, startSmtpFake, type RunningFake } from "../../scripts/fakes";

const root = fileURLToPath(new URL("../..", import.meta.url));

export default async function setup() {
  const port = process.env.E2E_PORT ?? "3199";
  const baseUrl = `http://127.0.0.1:${port}`;
  process.env.E2E_BASE_URL = baseUrl;
  const children: ChildProcess[] = [];
  const outboxDir = `${root}.data/test/outbox`;
  await rm(outboxDir, { recursive: true, force: true });
  const smtp = await startSmtpFake({ port: Number(process.env.E2E_SMTP_PORT ?? 2599), outboxDir });
  // The push fake (issue 13) and the alert worker, which sends through it.
  const pushDir = `${root}.data/test/push`;
  await rm(pushDir, { recursive: true, force: true });
  const push = await startPushFake({ port: Number(process.env.PUSH_FAKE_PORT ?? 4310), dir: pushDir });
  process.env.E2E_PUSH_URL = push.url;
  const s3 = await ensureS3Fake();
  const fakesEnv = {
    SMTP_PORT: String(smtp.port),
    DEV_OUTBOX_DIR: outboxDir,
    DEV_PUSH_DIR: pushDir,
    VAPID_KEYS_FILE: `${root}.data/test/vapid.json`,
    PHOTOS_S3_PORT: String(s3.port),
    PHOTOS_S3_DIR: s3.directory,
  };
  const server = spawn(process.execPath, [`${root}scripts/serve.mjs`, "./build/server/index.js"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", HOST: "127.0.0.1", PORT: port, APP_URL: baseUrl, ...fakesEnv },
    stdio: ["ignore", "ignore", "inherit"],
  });
  children.push(server);
  const worker = spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", APP_URL: baseUrl, ...fakesEnv },
    stdio: ["ignore", "ignore", "inherit"],
  });
  children.push(worker);
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (server.exitCode !== null) throw new Error(`the app server exited with ${server.exitCode}`);
    try {
      await fetch(`${baseUrl}/api/health`);
      break;
    } catch {
      if (Date.now() > deadline) throw new Error("the app server did not start within 30 s");
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  return async () => {
    for (const child of children) child.kill("SIGTERM");
    await smtp.close();
    await push.close();
    await s3.fake?.close();
  };
}

/**
 * The S3 fake for photos: the one `npm test` started before seeding (PHOTOS_S3_PORT answers), or
 * a new one on E2E_S3_PORT over the same folder, which then gets the demo photos if the seed
 * ran without it.
 */
async function ensureS3Fake(): Promise<{ port: number; directory: string; fake: RunningFake | null }> {
  const directory = process.env.PHOTOS_S3_DIR ?? `${root}.data/test/s3`;
  const running = process.env.PHOTOS_S3_PORT;
  if (running && (await fetch(`http://127.0.0.1:${running}/`).then(() => true, () => false))) {
    return { port: Number(running), directory, fake: null };
  }
  const fake = await startS3Fake({ port: Number(process.env.E2E_S3_PORT ?? 4598), directory });
  process.env.PHOTOS_S3_PORT = String(fake.port);
  process.env.PHOTOS_S3_DIR = directory;
  const { createDb } = await import("../../app/db/db.server");
  const { seedDemoPhotos } = await import("../../scripts/seed-photos");
  const { db, pool } = createDb(process.env.DATABASE_URL ?? "postgres://tilldawn@127.0.0.1:54339/tilldawn_test", 1);
  try {
    await seedDemoPhotos(db);
  } finally {
    await pool.end();
  }
  return { port: fake.port, directory, fake };
}
