/**
 * `npm run bench`: benchmark sections, each a named list of measurements with targets.
 * Add a section by appending to `sections`.
 */
import { build } from "esbuild";
import { gzipSync } from "node:zlib";
import { availableParallelism, loadavg } from "node:os";
import { fileURLToPath } from "node:url";
import { largeRig, LARGE_RIG_COUNTS } from "../tests/fixtures/large-rig";
import { parseProjectionRequest, runProjectionRequest } from "../app/engine/api";
import { runAudit } from "../app/engine/audit";
import { buildCircuitGraph } from "../app/engine/circuit-graph";
import { planForDawn } from "../app/engine/dawn-plan";
import { validateModel, type RigModel } from "../app/engine/model";
import { runProjection } from "../app/engine/projection";
import { solveState } from "../app/engine/solution";
import type { CurrentState } from "../app/engine/state";

interface Row {
  name: string;
  median: number;
  p95?: number;
  /** Median CPU time of this process per run (user + system): the engine's own cost when
   * other work shares the cores and stretches the wall-clock figures. */
  cpuMedian?: number;
  unit: string;
  target: number;
}
interface Section {
  name: string;
  run: () => Promise<Row[]> | Row[];
}

function timeIt(fn: () => unknown, opts: { warmup?: number; runs?: number } = {}): { median: number; p95: number; cpuMedian: number } {
  const warmup = opts.warmup ?? 100;
  const runs = opts.runs ?? 300;
  for (let i = 0; i < warmup; i++) fn();
  const samples: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    fn();
    samples.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  samples.sort((a, b) => a - b);
  cpu.sort((a, b) => a - b);
  return { median: samples[Math.floor(runs / 2)]!, p95: samples[Math.floor(runs * 0.95)]!, cpuMedian: cpu[Math.floor(runs / 2)]! };
}

function engineSections(): Section[] {
  const v = validateModel(largeRig());
  if (!v.ok) throw new Error(`large rig is invalid: ${JSON.stringify(v.issues.slice(0, 3))}`);
  const model: RigModel = v.model;
  const counts = { banks: model.banks.length, sources: model.sources.length, loads: model.loads.length, circuits: model.circuits.length };
  if (JSON.stringify(counts) !== JSON.stringify(LARGE_RIG_COUNTS)) throw new Error(`large rig counts ${JSON.stringify(counts)}`);
  const state: CurrentState = {
    dateTime: "2026-10-15T19:30:00-06:00",
    modeId: "m-parked",
    banks: [{ bankId: "house", socPct: 70 }, { bankId: "aux", restingV: 25.0 }, { bankId: "starter", socPct: 90 }],
    weatherFactor: 0.8,
  };
  const graph = buildCircuitGraph(model);
  const parsed = parseProjectionRequest({ model, state });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues.slice(0, 3)));
  let toggle = 0;
  return [
    {
      name: `Engine on a large rig (${counts.banks} banks, ${counts.sources} sources, ${counts.loads} loads, ${counts.circuits} circuits)`,
      run: () => {
        const proj = timeIt(() => runProjection(model, graph, state));
        const audit = timeIt(() => runAudit(model, buildCircuitGraph(model)));
        // One tap: a load switched on or off → the graph, projection, budget, audit and autonomy again.
        const tap = timeIt(() => {
          toggle++;
          const loadsOn = model.modes[0]!.loads.map((l) => l.loadId).filter((_, i) => i !== toggle % 40);
          runProjectionRequest({ ...parsed.value, state: { ...state, loadsOn } });
        });
        const validate = timeIt(() => validateModel(model));
        // The electrical solution for one switch change (fresh graph: nothing memoised).
        let flip = 0;
        const solution = timeIt(() => {
          flip++;
          solveState(model, buildCircuitGraph(model, { "sw-cab": flip % 2 ? "house" : "starter" }), { modeId: "m-parked" });
        });
        // Dawn plan on a state that falls short (house bank at 55 %), 60 loads: the greedy search.
        const short: CurrentState = { ...state, banks: [{ bankId: "house", socPct: 55 }, { bankId: "aux", socPct: 60 }, { bankId: "starter", socPct: 90 }] };
        const dawnProbe = planForDawn(model, graph, short, { marginSocPct: 5 });
        const dawn = timeIt(() => planForDawn(model, graph, short, { marginSocPct: 5 }), { warmup: 10, runs: 60 });
        // The floor, in the same run: the projection's step × load multiply-adds in a plain loop
        // (72 h of 5-min steps × every load), the least any projection of this rig can cost.
        const steps = (72 * 60) / 5;
        const watts = Float64Array.from(model.loads, (_, i) => 1 + (i % 7));
        const duty = Float64Array.from(model.loads, (_, i) => (i % 3) / 2);
        let sink = 0;
        const floor = timeIt(() => {
          let wh = 0;
          for (let t = 0; t < steps; t++) for (let i = 0; i < watts.length; i++) wh += watts[i]! * duty[i]! * (5 / 60);
          sink += wh;
        });
        if (sink === -1) console.log(sink); // keeps the loop from being optimised away
        return [
          { name: "72-h projection, 5-min steps", ...proj, unit: "ms", target: 2 },
          { name: `floor: ${steps} steps × ${watts.length} loads multiply-adds, same run`, ...floor, unit: "ms", target: Number.NaN },
          { name: "projection ÷ floor (CPU median)", median: proj.cpuMedian / Math.max(floor.cpuMedian, 1e-6), unit: "×", target: Number.NaN },
          { name: "full audit (circuits + findings) + circuit graph", ...audit, unit: "ms", target: 4 },
          { name: "electrical solution after a switch change (graph + solution)", ...solution, unit: "ms", target: 2 },
          { name: `dawn plan, ${dawnProbe.method} search (${dawnProbe.found ? `${dawnProbe.actions.length} actions` : "none found"}, ${dawnProbe.projectionsRun} projections)`, ...dawn, unit: "ms", target: 20 },
          { name: "all results for one toggle", ...tap, unit: "ms", target: 4 },
          { name: "model validation (zod + references)", ...validate, unit: "ms", target: Number.NaN },
        ];
      },
    },
    {
      name: "Engine bundle for the browser (esbuild, minified, gzip)",
      run: async () => {
        // Every engine module the app and the phone use (there is no barrel file).
        const dir = fileURLToPath(new URL("../app/engine/", import.meta.url));
        const modules = ["api", "audit", "autonomy", "battery", "cable", "capacity", "circuit-graph", "compare", "dawn-plan", "draw", "findings", "model", "now", "operations", "primary-bank", "projection", "solar", "solution", "state", "time"];
        const contents = modules.map((m) => `export * from "./${m}";`).join("\n");
        const size = async (external: string[]) => {
          const out = await build({ stdin: { contents, resolveDir: dir, loader: "ts" }, bundle: true, minify: true, format: "esm", platform: "browser", target: "es2022", write: false, external, treeShaking: true });
          const code = out.outputFiles[0]!.contents;
          return { raw: code.byteLength / 1024, gz: gzipSync(code, { level: 9 }).byteLength / 1024 };
        };
        const own = await size(["zod"]);
        const withZod = await size([]);
        return [
          { name: "engine alone (zod shared with the app), gzip", median: own.gz, unit: "KB", target: 30 },
          { name: "engine alone, minified", median: own.raw, unit: "KB", target: Number.NaN },
          { name: "engine + zod, gzip (for reference)", median: withZod.gz, unit: "KB", target: Number.NaN },
        ];
      },
    },
  ];
}

const sections: Section[] = [...engineSections()];

function fmt(x: number | undefined): string {
  return x === undefined || Number.isNaN(x) ? "—" : x.toFixed(x < 10 ? 3 : 1);
}

async function main(): Promise<void> {
  let failed = 0;
  for (const section of sections) {
    const rows = await section.run();
    console.log(`\n## ${section.name}\n`);
    console.log("| measure | median | p95 | CPU median | unit | target | ok |");
    console.log("|---|---:|---:|---:|---|---:|---|");
    for (const r of rows) {
      const ok = Number.isNaN(r.target) ? "" : r.median < r.target ? "yes" : "NO";
      if (ok === "NO") failed++;
      console.log(`| ${r.name} | ${fmt(r.median)} | ${fmt(r.p95)} | ${fmt(r.cpuMedian)} | ${r.unit} | ${Number.isNaN(r.target) ? "—" : `< ${r.target}`} | ${ok} |`);
    }
  }
  const [load1] = loadavg();
  console.log(`\nLoad average over the last minute: ${load1!.toFixed(2)} on ${availableParallelism()} cores (figures stretch when others share them).`);
  console.log(failed ? `${failed} measure(s) above target.` : "All measures within target.");
}

await main();
