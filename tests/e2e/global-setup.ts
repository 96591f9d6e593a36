// Starts the production build against the test database for the browser tests.
import { spawn, type ChildProcess } from "node:child_process";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL("../..", import.meta.url));

export default async function setup() {
  const port = process.env.E2E_PORT ?? "3199";
  const baseUrl = `http://127.0.0.1:${port}`;
  process.env.E2E_BASE_URL = baseUrl;
  const children: ChildProcess[] = [];
  const server = spawn(`${root}node_modules/.bin/react-router-serve`, ["./build/server/index.js"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", PORT: port, APP_URL: baseUrl },
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
  };
}
