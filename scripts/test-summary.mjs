// Adds up the vitest JSON reports and the non-test steps into one closing line.
// Usage: test-summary.mjs REPORT_DIR name:pass|fail ...
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";

const [dir, ...steps] = process.argv.slice(2);
let passed = 0;
let failed = 0;
let skipped = 0;
const failures = [];
for (const s of steps) {
  const i = s.lastIndexOf(":");
  const [name, outcome] = [s.slice(0, i), s.slice(i + 1)];
  const report = join(dir, `${name.replace(/ tests$/, "").replace("browser", "e2e")}.json`);
  if (name.endsWith("tests") && existsSync(report)) continue; // counted from its report
  if (outcome === "pass") passed++;
  else {
    failed++;
    failures.push(name);
  }
}
for (const file of existsSync(dir) ? readdirSync(dir) : []) {
  if (!file.endsWith(".json")) continue;
  const r = JSON.parse(readFileSync(join(dir, file), "utf8"));
  passed += r.numPassedTests ?? 0;
  failed += r.numFailedTests ?? 0;
  skipped += (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
  // A suite that failed to load has no tests but must still fail the run.
  for (const suite of r.testResults ?? []) {
    if (suite.status === "failed" && (suite.assertionResults ?? []).every((a) => a.status !== "failed")) {
      failed++;
      failures.push(`${file}: ${suite.name} (${(suite.message ?? "failed to run").split("\n")[0]})`);
    }
    for (const a of suite.assertionResults ?? []) {
      if (a.status === "failed") failures.push(`${file.replace(".json", "")}: ${a.fullName}`);
    }
  }
}
if (failures.length) {
  console.log("\nFailed:");
  for (const f of failures) console.log(`  - ${f}`);
}
console.log("");
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(failed > 0 ? 1 : 0);
