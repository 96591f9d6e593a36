// Starts the production build against the test database for the browser tests, with the
// local fakes (scripts/fakes.ts) it talks to: the SMTP fake whose messages /dev/outbox lists.
import { spawn, type ChildProcess } from "node:child_process";
import { rm } from "node:fs/promises";
import { fileURLToPath } from "node:url";
import { startSmtpFake } from "../../scripts/fakes";

const root = fileURLToPath(new URL("../..", import.meta.url));

export default async function setup() {
  const port = process.env.E2E_PORT ?? "3199";
  const baseUrl = `http://127.0.0.1:${port}`;
  process.env.E2E_BASE_URL = baseUrl;
  const children: ChildProcess[] = [];
  const outboxDir = `${root}.data/test/outbox`;
  await rm(outboxDir, { recursive: true, force: true });
  const smtp = await startSmtpFake({ port: Number(process.env.E2E_SMTP_PORT ?? 2599), outboxDir });
  const fakesEnv = { SMTP_PORT: String(smtp.port), DEV_OUTBOX_DIR: outboxDir };
  const server = spawn(process.execPath, [`${root}scripts/serve.mjs`, "./build/server/index.js"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", HOST: "127.0.0.1", PORT: port, APP_URL: baseUrl, ...fakesEnv },
    stdio: ["ignore", "ignore", "inherit"],
  });
  children.push(server);
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
  };
}
