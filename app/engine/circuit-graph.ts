/**
 * The circuit graph: the static wiring (every feed path from each bank port and charge source
 * to each load and inverter) plus the switch positions recorded for it. The state-dependent
 * answers (powered, from which banks, protection in the present positions) come from
 * `solveState` in ./solution; `loads` here summarises them for the first mode.
 */
import type { Bank, Circuit, NodeRef, RigModel, Switch } from "./model";
import { nodeKey, validateModel, type ModelIssue } from "./model";
import { how, type How } from "./explain";
import { mainBankId, solveState } from "./solution";

export interface SwitchStep {
  deviceId: string;
  name: string;
  kind: Switch["kind"] | "breaker";
  /** The position it must be in ("on", "house", "closed"…). */
  position: string;
  circuitId: string;
  location?: string;
}

export interface FeedPath {
  supply: { kind: "bank"; bankId: string; portId: string } | { kind: "source"; sourceId: string };
  /** Circuits in order from the supply to the load. */
  circuitIds: string[];
  /** Buses and devices between the supply and the load, in order. */
  via: { kind: NodeRef["kind"]; id: string; name: string }[];
  steps: SwitchStep[];
  switchCount: number;
  inverterIds: string[];
  /** The supply is a bank port that opens at the low-voltage cutoff. */
  lowVoltageProtected: boolean;
  /** The supply port needs the bank's load contactor engaged. */
  needsContactor: boolean;
}

export interface StandbyForced {
  kind: "contactor" | "inverter";
  id: string;
  name: string;
  w: number;
}

export interface LoadGraph {
  loadId: string;
  name: string;
  /** All paths from a bank port. */
  bankPaths: FeedPath[];
  /** Paths straight from a charge source (no bank), e.g. a load on the charge bus. */
  sourcePaths: FeedPath[];
  /** The conducting path in use (from the bank with the largest share), or null when unpowered. */
  primary: FeedPath | null;
  bankId: string | null;
  switchPath: SwitchStep[];
  switchCount: number;
  /** In the present positions, a bank feeding it has no low-voltage protection on that port. */
  outsideLowVoltageProtection: boolean;
  /** Banks this load can drain past their cutoff. */
  drainsBankIds: string[];
  forcesStandby: StandbyForced[];
  how: How;
}

export interface CircuitGraph {
  /** Positions recorded in the rig state that this graph was built for. */
  positions: Record<string, string>;
  /** Every feed path from a bank port (supply → sink), per load and per inverter. */
  paths: { loads: Record<string, FeedPath[]>; inverters: Record<string, FeedPath[]> };
  /** Per load, for the recorded positions and the first mode's loads. */
  loads: Record<string, LoadGraph>;
  /** How each inverter's DC side is fed. */
  inverters: Record<string, { bankId: string | null; needsContactor: boolean; lowVoltageProtected: boolean; switchPath: SwitchStep[] }>;
  /** For each circuit, the loads that any bank path through it can feed. */
  loadsByCircuit: Record<string, string[]>;
  /** For each bus, the loads whose primary path passes through it. */
  loadsByBus: Record<string, string[]>;
}

export type CircuitGraphResult = { ok: true; graph: CircuitGraph } | { ok: false; issues: ModelIssue[] };

const MAX_PATHS_PER_LOAD = 64;

/** Validate the model (cycles, unknown ids, unfed loads) and build the graph. Never throws. */
export function circuitGraphFor(doc: unknown, switchPositions?: Record<string, string>): CircuitGraphResult {
  const v = validateModel(doc);
  if (!v.ok) return v;
  return { ok: true, graph: buildCircuitGraph(v.model, switchPositions) };
}

/** Build the graph of an already validated model. */
export function buildCircuitGraph(model: RigModel, switchPositions: Record<string, string> = {}): CircuitGraph {
  const incoming = new Map<string, Circuit[]>();
  for (const c of model.circuits) {
    const k = nodeKey(c.to);
    const list = incoming.get(k);
    if (list) list.push(c);
    else incoming.set(k, [c]);
  }
  const banks = new Map<string, Bank>(model.banks.map((b) => [b.id, b]));
  const switches = new Map(model.switches.map((s) => [s.id, s]));
  const protections = new Map(model.protections.map((p) => [p.id, p]));
  const inverters = new Map(model.inverters.map((i) => [i.id, i]));
  const names = new Map<string, string>();
  for (const list of [model.buses, model.sources, model.inverters, model.loads, model.banks]) {
    for (const o of list) names.set(o.id, o.name);
  }

  const loadsByCircuit: Record<string, string[]> = {};
  const loadsByBus: Record<string, string[]> = {};
  for (const c of model.circuits) loadsByCircuit[c.id] = [];
  for (const b of model.buses) loadsByBus[b.id] = [];

  const makePath = (circuits: Circuit[]): FeedPath => {
    // circuits are supply → load.
    const first = circuits[0]!;
    const steps: SwitchStep[] = [];
    const via: FeedPath["via"] = [];
    const inverterIds: string[] = [];
    circuits.forEach((c, i) => {
      if (i > 0 && (c.from.kind === "bus" || c.from.kind === "inverter")) {
        via.push({ kind: c.from.kind, id: c.from.id, name: names.get(c.from.id) ?? c.from.id });
        if (c.from.kind === "inverter") inverterIds.push(c.from.id);
      }
      if (c.protectionId !== undefined) {
        const p = protections.get(c.protectionId);
        if (p?.kind === "breaker") {
          steps.push({ deviceId: p.id, name: p.name, kind: "breaker", position: "closed", circuitId: c.id, ...(p.location ? { location: p.location } : {}) });
        }
      }
      for (const s of c.switches) {
        const sw = switches.get(s.switchId);
        if (!sw) continue;
        steps.push({ deviceId: sw.id, name: sw.name, kind: sw.kind, position: s.position, circuitId: c.id, ...(sw.location ? { location: sw.location } : {}) });
      }
    });
    let supply: FeedPath["supply"];
    let lowVoltageProtected = false;
    let needsContactor = false;
    if (first.from.kind === "bank") {
      supply = { kind: "bank", bankId: first.from.id, portId: first.from.port };
      const bank = banks.get(first.from.id);
      const port = bank?.ports.find((p) => p.id === (first.from as { port: string }).port);
      lowVoltageProtected = port?.lowVoltageProtected ?? false;
      // The port conducts only in some BMS states (a contactor or a switched output).
      needsContactor = !!bank?.bms && !!port && !bank.bms.states[0]!.livePorts.includes(port.id);
    } else {
      supply = { kind: "source", sourceId: first.from.id };
    }
    return {
      supply,
      circuitIds: circuits.map((c) => c.id),
      via,
      steps,
      switchCount: steps.length,
      inverterIds,
      lowVoltageProtected,
      needsContactor,
    };
  };

  const pathsTo = (start: string): { bankPaths: FeedPath[]; sourcePaths: FeedPath[] } => {
    const bankPaths: FeedPath[] = [];
    const sourcePaths: FeedPath[] = [];
    // Depth-first upstream search; `trail` holds circuits target → supply.
    const walk = (key: string, trail: Circuit[], seen: Set<string>): void => {
      for (const c of incoming.get(key) ?? []) {
        if (bankPaths.length + sourcePaths.length >= MAX_PATHS_PER_LOAD) return;
        const up = nodeKey(c.from);
        if (seen.has(up)) continue;
        const next = [...trail, c];
        if (c.from.kind === "bank") bankPaths.push(makePath([...next].reverse()));
        else if (c.from.kind === "source") sourcePaths.push(makePath([...next].reverse()));
        else {
          seen.add(up);
          walk(up, next, seen);
          seen.delete(up);
        }
      }
    };
    walk(start, [], new Set([start]));
    return { bankPaths, sourcePaths };
  };
  const paths: CircuitGraph["paths"] = { loads: {}, inverters: {} };
  for (const inv of model.inverters) paths.inverters[inv.id] = pathsTo(nodeKey({ kind: "inverter", id: inv.id })).bankPaths;
  const sourcePathsOf: Record<string, FeedPath[]> = {};
  for (const load of model.loads) {
    const { bankPaths, sourcePaths } = pathsTo(nodeKey({ kind: "load", id: load.id }));
    paths.loads[load.id] = bankPaths;
    sourcePathsOf[load.id] = sourcePaths;
  }
  const rankStatic = (p: FeedPath) => (p.supply.kind === "bank" && banks.get(p.supply.bankId)?.role === "house" ? 0 : 100) + p.switchCount;
  const graph: CircuitGraph = { positions: switchPositions, paths, loads: {}, inverters: {}, loadsByCircuit, loadsByBus };
  const sol = solveState(model, graph, { modeId: model.modes[0]!.id });
  const inverterFeeds: CircuitGraph["inverters"] = graph.inverters;
  for (const inv of model.inverters) {
    const f = sol.inverters[inv.id]!;
    inverterFeeds[inv.id] = {
      bankId: mainBankId(f.bankShares),
      needsContactor: f.path?.needsContactor ?? false,
      lowVoltageProtected: f.lowVoltageProtected,
      switchPath: f.path?.steps ?? [],
    };
  }
  const loads = graph.loads;
  for (const load of model.loads) {
    const bankPaths = paths.loads[load.id]!;
    const feed = sol.loads[load.id]!;
    // The conducting path; when unpowered, the path it would use (house bank, fewest devices),
    // so the screens can say which switch stands in the way.
    const primary = feed.path ?? [...bankPaths].sort((a, b) => rankStatic(a) - rankStatic(b))[0] ?? null;
    const drains = new Set(feed.drainsBankIds);
    const forcesStandby: StandbyForced[] = [];
    if (primary?.needsContactor && primary.supply.kind === "bank") {
      const b = banks.get(primary.supply.bankId)!;
      const states = b.bms?.states ?? [];
      const w = states.length ? Math.max(...states.map((x) => x.standbyW)) - states[0]!.standbyW : 0;
      forcesStandby.push({ kind: "contactor", id: b.id, name: `${b.name} load contactor`, w });
    }
    for (const invId of primary?.inverterIds ?? []) {
      const inv = inverters.get(invId)!;
      forcesStandby.push({ kind: "inverter", id: inv.id, name: `${inv.name} idle`, w: inv.idleW });
    }
    const bankId = mainBankId(feed.bankShares);
    const supplyName = primary?.supply.kind === "bank"
      ? `${names.get(primary.supply.bankId)} (${primary.supply.portId} port)`
      : "no bank";
    loads[load.id] = {
      loadId: load.id,
      name: load.name,
      bankPaths,
      sourcePaths: sourcePathsOf[load.id]!,
      primary,
      bankId,
      switchPath: primary?.steps ?? [],
      switchCount: primary?.switchCount ?? 0,
      outsideLowVoltageProtection: drains.size > 0,
      drainsBankIds: [...drains],
      forcesStandby,
      how: how(
        "feeds = conducting circuits from live bank ports in the present switch positions; devices listed from the bank port to the load",
        {
          supply: supplyName,
          via: primary?.via.map((v) => v.name).join(" → ") ?? "",
          devices: primary?.switchCount ?? 0,
          pathsFromBanks: bankPaths.length,
        },
        drains.size
          ? "Fed from a port without low-voltage protection: this load can drain the bank past its cutoff."
          : undefined,
      ),
    };
    for (const p of bankPaths) {
      for (const cid of p.circuitIds) {
        const list = loadsByCircuit[cid]!;
        if (!list.includes(load.id)) list.push(load.id);
      }
    }
    for (const v of primary?.via ?? []) if (v.kind === "bus") loadsByBus[v.id]?.push(load.id);
  }
  return graph;
}
