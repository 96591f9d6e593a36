import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

const root = fileURLToPath(new URL("..", import.meta.url));
const alias = { "~": `${root}app` };

// Three projects: unit (pure code, beside it), integration (real PostgreSQL) and e2e (the built
// app in Debian's Chromium). `npm test` runs them in that order with a build in between.
export default defineConfig({
  root,
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: "unit",
          root,
          include: ["app/**/*.test.{ts,tsx}", "scripts/**/*.test.ts", "tests/unit/**/*.test.{ts,tsx}"],
          environment: "node",
        },
      },
      {
        resolve: { alias },
        test: {
          name: "integration",
          root,
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          testTimeout: 30_000,
          hookTimeout: 30_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: "e2e",
          root,
          include: ["tests/e2e/**/*.test.ts"],
          environment: "node",
          globalSetup: ["tests/e2e/global-setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 60_000,
          fileParallelism: false,
          // A browser on a busy machine can take more than the default second to reach a state.
          expect: { poll: { timeout: 10_000 } },
        },
      },
    ],
  },
});
