/**
 * How to power a load from a named starting state: the ordered operations a person does
 * (press, turn, reset), each with where the device is, and the checks (fuses and breakers on
 * the path, switches already in position) that are not operations.
 *
 * Starting states: "all-off" (every switch at "off" or its first position; `hold` keeps chosen
 * switches where they are, e.g. a changeover already set) and "now" (the present positions).
 * Among the feed paths, the one with the fewest operations wins; ties go to a path behind
 * low-voltage protection, then to a house bank.
 */
import type { RigModel } from "./model";
import type { CircuitGraph } from "./circuit-graph";
import { how, type How } from "./explain";
import type { PlanInput } from "./plan";
import { offPosition, pathSettings, solveState } from "./solution";

export type StartState = "all-off" | "now";

export interface Operation {
  deviceId: string;
  name: string;
  kind: string;
  from: string;
  to: string;
  /** "bms": a control that sets the BMS state; "circuit": a switch in a circuit. */
  role: "bms" | "circuit";
  location?: string;
}

export interface Check {
  deviceId: string;
  name: string;
  kind: string;
  /** What to check: "intact" (fuse), "closed" (breaker) or the position already set. */
  expect: string;
  location?: string;
}

export interface LoadOperations {
  loadId: string;
  name: string;
  start: StartState;
  operations: Operation[];
  operationCount: number;
  checks: Check[];
  supply: { bankId: string; portId: string } | null;
  lowVoltageProtected: boolean;
  how: How;
}

export function startPositions(model: RigModel, graph: CircuitGraph, start: StartState, plan?: PlanInput, hold: Record<string, string> = {}): Record<string, string> {
  if (start === "now") return { ...solveState(model, graph, plan ?? { modeId: model.modes[0]!.id }).at, ...hold };
  const at: Record<string, string> = {};
  for (const sw of model.switches) at[sw.id] = hold[sw.id] ?? offPosition(sw);
  return at;
}

const allOffCache = new WeakMap<CircuitGraph, Map<string, LoadOperations | null>>();

/** Operations to power one load; null when no path can power it. ("all-off" without `hold` is memoised per graph.) */
export function operationsFor(
  model: RigModel, graph: CircuitGraph, loadId: string, start: StartState,
  opts: { plan?: PlanInput; hold?: Record<string, string> } = {},
): LoadOperations | null {
  if (start === "all-off" && !opts.hold) {
    let m = allOffCache.get(graph);
    if (!m) allOffCache.set(graph, (m = new Map()));
    if (!m.has(loadId)) m.set(loadId, computeOperations(model, graph, loadId, start, opts));
    return m.get(loadId)!;
  }
  return computeOperations(model, graph, loadId, start, opts);
}

function computeOperations(
  model: RigModel, graph: CircuitGraph, loadId: string, start: StartState,
  opts: { plan?: PlanInput; hold?: Record<string, string> },
): LoadOperations | null {
  const load = model.loads.find((l) => l.id === loadId);
  if (!load) return null;
  const at = startPositions(model, graph, start, opts.plan, opts.hold);
  const switches = new Map(model.switches.map((s) => [s.id, s]));
  const circuits = new Map(model.circuits.map((c) => [c.id, c]));
  const protections = new Map(model.protections.map((p) => [p.id, p]));
  const banks = new Map(model.banks.map((b) => [b.id, b]));
  let best: { ops: Operation[]; checks: Check[]; supply: { bankId: string; portId: string }; protected: boolean; rank: number } | null = null;
  for (const p of graph.paths.loads[loadId] ?? []) {
    if (p.supply.kind !== "bank") continue;
    const supply = p.supply;
    const bms = pathSettings(model, p, true);
    const circuitOnly = pathSettings(model, p, false);
    if (bms === null || circuitOnly === null) continue;
    const bmsCount = bms.length - circuitOnly.length;
    const need = new Map<string, string>();
    let ok = true;
    bms.forEach((s) => {
      const was = need.get(s.switchId);
      if (was !== undefined && was !== s.position) ok = false;
      need.set(s.switchId, s.position);
    });
    // A held switch that the path needs elsewhere cannot be used.
    for (const [id, pos] of need) if (opts.hold?.[id] !== undefined && opts.hold[id] !== pos) ok = false;
    if (!ok) continue;
    const ops: Operation[] = [];
    const checks: Check[] = [];
    const done = new Set<string>();
    bms.forEach((s, i) => {
      if (done.has(s.switchId)) return;
      done.add(s.switchId);
      const sw = switches.get(s.switchId)!;
      const loc = sw.location ? { location: sw.location } : {};
      if (at[s.switchId] === s.position) checks.push({ deviceId: sw.id, name: sw.name, kind: sw.kind, expect: s.position, ...loc });
      else ops.push({ deviceId: sw.id, name: sw.name, kind: sw.kind, from: at[s.switchId] ?? offPosition(sw), to: s.position, role: i < bmsCount ? "bms" : "circuit", ...loc });
    });
    for (const cid of p.circuitIds) {
      const c = circuits.get(cid)!;
      const pr = c.protectionId ? protections.get(c.protectionId) : undefined;
      if (pr) checks.push({ deviceId: pr.id, name: pr.name, kind: pr.kind, expect: pr.kind === "fuse" ? "intact" : "closed", ...(pr.location ? { location: pr.location } : {}) });
    }
    const house = banks.get(supply.bankId)?.role === "house";
    const rank = ops.length * 100 + (p.lowVoltageProtected ? 0 : 10) + (house ? 0 : 1);
    if (!best || rank < best.rank) best = { ops, checks, supply: { bankId: supply.bankId, portId: supply.portId }, protected: p.lowVoltageProtected, rank };
  }
  if (!best) return null;
  return {
    loadId,
    name: load.name,
    start,
    operations: best.ops,
    operationCount: best.ops.length,
    checks: best.checks,
    supply: best.supply,
    lowVoltageProtected: best.protected,
    how: how(
      "operations = BMS controls, then switches from the bank port to the load, that are not already in the position the path needs; fuses, breakers and switches already set are checks",
      { start, operations: best.ops.length, checks: best.checks.length, supply: `${best.supply.bankId}/${best.supply.portId}` },
      "Of all feed paths, the one with the fewest operations; ties go to a path behind low-voltage protection, then a house bank.",
    ),
  };
}
