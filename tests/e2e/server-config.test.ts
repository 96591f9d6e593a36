import { spawn, spawnSync } from "node:child_process";
import { createServer, type Server } from "node:net";
import { fileURLToPath } from "node:url";
import { describe, expect, test } from "vitest";

const root = fileURLToPath(new URL("../..", import.meta.url));

function serve(env: Record<string, string>) {
  return spawn(process.execPath, [`${root}scripts/serve.mjs`, "./build/server/index.js"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", HOST: "127.0.0.1", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
}

async function waitFor(url: string, ms = 20_000): Promise<Response> {
  const deadline = Date.now() + ms;
  for (;;) {
    try {
      return await fetch(url);
    } catch (error) {
      if (Date.now() > deadline) throw error;
      await new Promise((r) => setTimeout(r, 100));
    }
  }
}

describe("Server configuration and health", () => {
  test("the health check answers 503 with the database down, not a crash", async () => {
    const child = serve({ PORT: "3197", DATABASE_URL: "postgres://tilldawn@127.0.0.1:9/nowhere" });
    try {
      const res = await waitFor("http://127.0.0.1:3197/api/health");
      expect(res.status).toBe(503);
      const body = (await res.json()) as { status: string; database: { status: string } };
      expect(body.database.status).toBe("down");
      expect(body.status).toBe("degraded");
    } finally {
      child.kill("SIGTERM");
    }
  });

  test("a bad setting stops the server at boot with a message naming the variable", async () => {
    const child = serve({ PORT: "3196", DATABASE_URL: "mysql://nobody@127.0.0.1/none" });
    let stderr = "";
    child.stderr.on("data", (chunk) => (stderr += String(chunk)));
    const code = await new Promise<number | null>((resolve) => child.on("exit", resolve));
    expect(code).toBe(78);
    expect(stderr).toContain("Tilldawn cannot start: bad configuration.");
    expect(stderr).toContain("DATABASE_URL: must be a postgres:// URL");
    expect(stderr).not.toMatch(/\n\s+at /); // no stack trace
  });

  test("npm start refuses a port that is taken, with a clear message", async () => {
    const blocker: Server = createServer();
    await new Promise<void>((resolve) => blocker.listen(3195, "127.0.0.1", resolve));
    try {
      const run = spawnSync("bash", ["scripts/start.sh"], {
        cwd: root,
        env: { ...process.env, PORT: "3195", TILLDAWN_DATA_DIR: `${root}.data/start-test` },
        encoding: "utf8",
        timeout: 60_000,
      });
      expect(run.status).not.toBe(0);
      expect(run.stderr).toContain("Port 3195 is taken by another program");
      expect(run.stderr).not.toMatch(/\n\s+at /);
    } finally {
      blocker.close();
    }
  });

  test("npm start refuses a bad setting before starting anything", () => {
    const run = spawnSync("bash", ["scripts/start.sh"], {
      cwd: root,
      env: { ...process.env, PORT: "not-a-port", TILLDAWN_DATA_DIR: `${root}.data/start-test` },
      encoding: "utf8",
      timeout: 60_000,
    });
    expect(run.status).not.toBe(0);
    expect(run.stderr).toContain("PORT:");
    expect(run.stderr).toContain("Tilldawn cannot start: bad configuration.");
  });

  test("npm start stops with a clear message when its data folder cannot be written", () => {
    const run = spawnSync("bash", ["scripts/start.sh"], {
      cwd: root,
      env: { ...process.env, PORT: "3194", PGPORT: "54359", TILLDAWN_DATA_DIR: "/proc/tilldawn-data" },
      encoding: "utf8",
      timeout: 120_000,
    });
    expect(run.status).not.toBe(0);
    expect(run.stderr).toContain("Cannot create /proc/tilldawn-data");
  });
});
