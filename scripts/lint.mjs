// Runs ESLint over the project with the config in scripts/.
import { spawnSync } from "node:child_process";

const result = spawnSync(
  "./node_modules/.bin/eslint",
  ["--config", "scripts/eslint.config.js", "--max-warnings", "0", "app", "sw", "scripts", "tests", ...process.argv.slice(2)],
  { stdio: "inherit" },
);
process.exit(result.status ?? 1);
