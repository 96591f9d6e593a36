/**
 * The electrical solution of one rig state: for the present switch positions, every switch's
 * position, each BMS's state, the nets (groups of bank ports, buses and sources joined by
 * conducting circuits, so at one potential), which loads are powered and from which banks,
 * how a shared bus's draw is split between paralleled banks, which banks each source's
 * current reaches, and the standby the BMS states draw. Recomputed whenever a position, a
 * load or an inverter changes (memoised per graph and plan).
 *
 * Split rule (paralleled banks on one net): current divides inversely to each bank's internal
 * resistance (current-divider rule from Ohm's and Kirchhoff's laws, any circuits textbook), when
 * every bank on the net gives `internalResistanceMOhm`; otherwise in proportion to capacity
 * (Ah × parallel count × health), which is the same rule when resistance scales inversely with
 * capacity within one battery design (trade practice). The same shares route a source's current
 * into the banks on its net. Shares are fixed for a state; a bank that is full or at its floor
 * does not pass its share to the others (a planning simplification).
 */
import type { Bank, Circuit, RigModel, Switch } from "./model";
import { nodeKey } from "./model";
import type { CircuitGraph, FeedPath } from "./circuit-graph";
import { bankCapacityAh, bankNominalV } from "./battery";
import { findMode, planLoads, type PlanInput } from "./plan";

export type PositionOrigin = "set" | "normal" | "follows-loads" | "off" | "unknown";

export interface ResolvedPosition {
  switchId: string;
  name: string;
  kind: Switch["kind"];
  position: string;
  /** set: recorded in the rig state; normal: the model's normal position; follows-loads: put
   * where the loads switched on need it; off: nothing needs it; unknown: a changeover with no
   * position (taken as "off"; an audit finding). */
  origin: PositionOrigin;
  location?: string;
}

export interface BankShare {
  bankId: string;
  portId: string;
  /** 0..1; shares on one net sum to 1. */
  share: number;
}

export interface Net {
  id: number;
  current: "dc" | "ac";
  /** Node keys in the net ("bus:x", "bank:b/port", "source:s", "inverter-ac:i"). */
  nodes: string[];
  banks: BankShare[];
  sourceIds: string[];
  /** Inverters whose AC output is this net (AC nets). */
  acFromInverterIds: string[];
  voltageV: number;
  splitRule: "internal-resistance" | "capacity" | "single";
}

export interface Feed {
  powered: boolean;
  /** The net the load or inverter hangs off (DC net of its inverter for AC loads). */
  netId: number | null;
  bankShares: BankShare[];
  /** Powered by a source with no bank on its net (only while the source delivers). */
  sourceOnly: boolean;
  inverterId: string | null;
  /** A conducting path from the bank with the largest share, supply → load. */
  path: FeedPath | null;
  /** Every bank feeding it opens at its low-voltage cutoff. */
  lowVoltageProtected: boolean;
  /** Banks it can drain past their cutoff (their port on the net has no protection). */
  drainsBankIds: string[];
  voltageV: number;
}

export interface BmsStateNow {
  bankId: string;
  stateId: string | null;
  stateName: string;
  standbyW: number;
  livePorts: string[];
}

export interface Solution {
  positions: Record<string, ResolvedPosition>;
  /** switchId → position (the same as `positions`, flat). */
  at: Record<string, string>;
  bms: Record<string, BmsStateNow>;
  nets: Net[];
  loads: Record<string, Feed>;
  inverters: Record<string, Feed & { on: boolean }>;
  sources: Record<string, { netId: number | null; bankShares: BankShare[] }>;
  /** Changeovers with no position recorded and no normal position. */
  unknownChangeovers: string[];
  /** Loads on and inverters on this solution was built for. */
  loadsOn: string[];
  inverterIdsOn: string[];
  standbyBmsW: number;
}

/** The position "all off" puts a switch in: "off" when it has one, else its first. */
export function offPosition(sw: Switch): string {
  return sw.positions.includes("off") ? "off" : sw.positions[0]!;
}

/** The BMS state a bank is in for the given positions (the last state whose requirements hold). */
export function bmsStateFor(bank: Bank, at: Record<string, string>): BmsStateNow {
  if (!bank.bms) return { bankId: bank.id, stateId: null, stateName: "no BMS", standbyW: 0, livePorts: bank.ports.map((p) => p.id) };
  let idx = 0;
  bank.bms.states.forEach((st, i) => {
    if (st.requires.every((r) => at[r.switchId] === r.position)) idx = i;
  });
  const st = bank.bms.states[idx]!;
  return { bankId: bank.id, stateId: st.id, stateName: st.name, standbyW: st.standbyW, livePorts: st.livePorts };
}

/** Switch settings a port needs from its BMS (the lowest state that makes it live), or null if none does. */
export function portRequires(bank: Bank, portId: string): { switchId: string; position: string }[] | null {
  if (!bank.bms) return [];
  const st = bank.bms.states.find((s) => s.livePorts.includes(portId));
  return st ? st.requires : null;
}

export function circuitConducts(c: Circuit, at: Record<string, string>): boolean {
  return c.switches.every((s) => at[s.switchId] === s.position);
}

const circuitMaps = new WeakMap<RigModel, Map<string, Circuit>>();
function circuitMap(model: RigModel): Map<string, Circuit> {
  let m = circuitMaps.get(model);
  if (!m) circuitMaps.set(model, (m = new Map(model.circuits.map((c) => [c.id, c]))));
  return m;
}

/** Which banks the path's supply port needs in which state, plus the circuit settings. */
export function pathSettings(model: RigModel, p: FeedPath, withBms = true): { switchId: string; position: string }[] | null {
  const circuits = circuitMap(model);
  const out: { switchId: string; position: string }[] = [];
  if (withBms && p.supply.kind === "bank") {
    const supply = p.supply;
    const bank = model.banks.find((b) => b.id === supply.bankId);
    const req = bank ? portRequires(bank, supply.portId) : null;
    if (req === null) return null;
    out.push(...req);
  }
  for (const cid of p.circuitIds) {
    const c = circuits.get(cid);
    if (c) out.push(...c.switches);
  }
  return out;
}

interface SolveInput extends PlanInput {
  /** Positions recorded in the rig state (win over everything). */
  positions?: Record<string, string>;
}

const cache = new WeakMap<CircuitGraph, Map<string, Solution>>();

/** The solution for a graph (its positions) and a plan. Memoised. */
export function solveState(model: RigModel, graph: CircuitGraph, plan: Partial<PlanInput> = {}): Solution {
  const key = JSON.stringify([plan.modeId ?? null, plan.loadsOn ?? null, plan.inverterIdsOn ?? null]);
  let byPlan = cache.get(graph);
  if (!byPlan) cache.set(graph, (byPlan = new Map()));
  let s = byPlan.get(key);
  if (!s) {
    s = solve(model, graph, { modeId: plan.modeId ?? model.modes[0]!.id, ...(plan.loadsOn ? { loadsOn: plan.loadsOn } : {}), ...(plan.inverterIdsOn ? { inverterIdsOn: plan.inverterIdsOn } : {}), positions: graph.positions });
    if (byPlan.size > 64) byPlan.clear();
    byPlan.set(key, s);
  }
  return s;
}

/** Resolve every switch's position: recorded, normal, following the loads on, or off. */
export function resolvePositions(model: RigModel, graph: CircuitGraph, input: SolveInput): { positions: Record<string, ResolvedPosition>; unknownChangeovers: string[]; loadsOn: string[]; inverterIdsOn: string[] } {
  const recorded = input.positions ?? {};
  const at: Record<string, string> = {};
  const origin: Record<string, PositionOrigin> = {};
  const unknownChangeovers: string[] = [];
  for (const sw of model.switches) {
    const rec = recorded[sw.id];
    if (rec !== undefined && sw.positions.includes(rec)) { at[sw.id] = rec; origin[sw.id] = "set"; }
    else if (sw.normalPosition !== undefined) { at[sw.id] = sw.normalPosition; origin[sw.id] = "normal"; }
    else if (sw.kind === "changeover") { at[sw.id] = offPosition(sw); origin[sw.id] = "unknown"; unknownChangeovers.push(sw.id); }
  }
  const houseIds = new Set(model.banks.filter((b) => b.role === "house").map((b) => b.id));
  const planned = planLoads(model, { modeId: input.modeId, ...(input.loadsOn ? { loadsOn: input.loadsOn } : {}) });
  const loadsOn = planned.filter((p) => p.on).map((p) => p.load.id);

  // Inverters on: the plan's, else the mode's plus those an AC load on needs.
  let inverterIdsOn: string[];
  if (input.inverterIdsOn) inverterIdsOn = [...input.inverterIdsOn];
  else {
    const on = new Set(findMode(model, input.modeId).inverterIdsOn);
    for (const p of planned) {
      if (!p.on || p.load.current !== "ac") continue;
      const first = graph.paths.loads[p.load.id]?.[0];
      for (const id of first?.inverterIds ?? []) on.add(id);
    }
    inverterIdsOn = [...on];
  }

  const follow = (paths: FeedPath[], withBms: boolean) => {
    let best: { p: FeedPath; need: { switchId: string; position: string }[]; rank: number } | null = null;
    for (const p of paths) {
      const settings = pathSettings(model, p, withBms);
      if (settings === null) continue;
      let ok = true;
      const need: { switchId: string; position: string }[] = [];
      for (const s of settings) {
        const cur = at[s.switchId];
        if (cur === undefined) {
          if (need.some((n) => n.switchId === s.switchId && n.position !== s.position)) { ok = false; break; }
          need.push(s);
        } else if (cur !== s.position) { ok = false; break; }
      }
      if (!ok) continue;
      const bankId = p.supply.kind === "bank" ? p.supply.bankId : "";
      const rank = (houseIds.has(bankId) ? 0 : 100) + need.length;
      if (!best || rank < best.rank) best = { p, need, rank };
    }
    if (best) for (const n of best.need) { at[n.switchId] = n.position; origin[n.switchId] = "follows-loads"; }
  };
  // 1. Loads and inverters that run: their circuits and the BMS states their ports need.
  for (const invId of inverterIdsOn) follow(graph.paths.inverters[invId] ?? [], true);
  for (const id of loadsOn) follow(graph.paths.loads[id] ?? [], true);
  // Charge sources in use in the mode: the switches in their own output circuits.
  const mode = findMode(model, input.modeId);
  for (const src of model.sources) {
    const m = mode.sources.find((x) => x.sourceId === src.id);
    const used = src.kind === "solar" ? m?.enabled !== false : m?.enabled === true;
    if (!used) continue;
    for (const c of model.circuits) {
      if (c.from.kind !== "source" || c.from.id !== src.id) continue;
      if (c.switches.some((x) => at[x.switchId] !== undefined && at[x.switchId] !== x.position)) continue;
      for (const x of c.switches) if (at[x.switchId] === undefined) { at[x.switchId] = x.position; origin[x.switchId] = "follows-loads"; }
    }
  }
  // 2. Loads and inverters left connected for their standby draw: circuit switches only.
  for (const inv of model.inverters) if (!inverterIdsOn.includes(inv.id) && (inv.offW ?? 0) > 0) follow(graph.paths.inverters[inv.id] ?? [], false);
  for (const p of planned) if (!p.on && (p.load.standbyW ?? 0) > 0) follow(graph.paths.loads[p.load.id] ?? [], false);

  const positions: Record<string, ResolvedPosition> = {};
  for (const sw of model.switches) {
    if (at[sw.id] === undefined) { at[sw.id] = offPosition(sw); origin[sw.id] = "off"; }
    positions[sw.id] = { switchId: sw.id, name: sw.name, kind: sw.kind, position: at[sw.id]!, origin: origin[sw.id]!, ...(sw.location ? { location: sw.location } : {}) };
  }
  return { positions, unknownChangeovers, loadsOn, inverterIdsOn };
}

function solve(model: RigModel, graph: CircuitGraph, input: SolveInput): Solution {
  const { positions, unknownChangeovers, loadsOn, inverterIdsOn } = resolvePositions(model, graph, input);
  const at: Record<string, string> = {};
  for (const [id, p] of Object.entries(positions)) at[id] = p.position;
  const banks = new Map(model.banks.map((b) => [b.id, b]));
  const bms: Record<string, BmsStateNow> = {};
  const live = new Set<string>();
  for (const b of model.banks) {
    const st = bmsStateFor(b, at);
    bms[b.id] = st;
    for (const p of st.livePorts) live.add(`bank:${b.id}/${p}`);
  }

  // Union-find over bank ports, buses, sources and inverter AC outputs.
  const parent = new Map<string, string>();
  const find = (x: string): string => {
    let r = x;
    while (parent.get(r) !== r) r = parent.get(r)!;
    let y = x;
    while (parent.get(y) !== r) { const n = parent.get(y)!; parent.set(y, r); y = n; }
    return r;
  };
  const add = (x: string) => { if (!parent.has(x)) parent.set(x, x); };
  const union = (a: string, b: string) => { add(a); add(b); const ra = find(a), rb = find(b); if (ra !== rb) parent.set(ra, rb); };
  for (const b of model.buses) add(`bus:${b.id}`);
  for (const s of model.sources) add(`source:${s.id}`);
  for (const k of live) add(k);
  for (const inv of model.inverters) add(`inverter-ac:${inv.id}`);
  const nodeOf = (ref: Circuit["from"], side: "from" | "to"): string | null => {
    if (ref.kind === "bank") { const k = nodeKey(ref); return live.has(k) ? k : null; }
    if (ref.kind === "bus" || ref.kind === "source") return nodeKey(ref);
    if (ref.kind === "inverter" && side === "from") return `inverter-ac:${ref.id}`;
    return null;
  };
  const conducting = new Set<string>();
  for (const c of model.circuits) {
    if (!circuitConducts(c, at)) continue;
    conducting.add(c.id);
    const a = nodeOf(c.from, "from"), b = nodeOf(c.to, "to");
    if (a && b) union(a, b);
  }

  // Nets.
  const netIndex = new Map<string, number>();
  const nets: Net[] = [];
  for (const k of parent.keys()) {
    const root = find(k);
    let i = netIndex.get(root);
    if (i === undefined) {
      i = nets.length;
      netIndex.set(root, i);
      nets.push({ id: i, current: "dc", nodes: [], banks: [], sourceIds: [], acFromInverterIds: [], voltageV: 0, splitRule: "single" });
    }
    const net = nets[i]!;
    net.nodes.push(k);
    if (k.startsWith("source:")) net.sourceIds.push(k.slice(7));
    if (k.startsWith("inverter-ac:")) { net.acFromInverterIds.push(k.slice(12)); net.current = "ac"; }
    if (k.startsWith("bus:") && model.buses.find((b) => b.id === k.slice(4))?.current === "ac") net.current = "ac";
  }
  for (const net of nets) {
    const ports = net.nodes.filter((k) => k.startsWith("bank:")).map((k) => {
      const [bankId, portId] = k.slice(5).split("/") as [string, string];
      return { bankId, portId };
    });
    // One entry per bank (a bank with two ports on one net counts once).
    const seen = new Map<string, { bankId: string; portId: string }>();
    for (const p of ports) if (!seen.has(p.bankId)) seen.set(p.bankId, p);
    const list = [...seen.values()];
    const allR = list.length > 1 && list.every((p) => banks.get(p.bankId)!.internalResistanceMOhm !== undefined);
    const w = list.map((p) => {
      const b = banks.get(p.bankId)!;
      return allR ? 1 / b.internalResistanceMOhm! : bankCapacityAh(b);
    });
    const total = w.reduce((s, x) => s + x, 0);
    net.banks = list.map((p, i) => ({ ...p, share: total > 0 ? w[i]! / total : 1 / list.length }));
    net.splitRule = list.length <= 1 ? "single" : allR ? "internal-resistance" : "capacity";
    const main = [...net.banks].sort((a, b) => b.share - a.share)[0];
    const fallback = model.banks.find((b) => b.role === "house") ?? model.banks[0]!;
    net.voltageV = bankNominalV(main ? banks.get(main.bankId)! : fallback);
  }
  const netOfNode = (k: string): Net | null => (parent.has(k) ? nets[netIndex.get(find(k))!]! : null);

  const protectionOf = (shares: BankShare[], netNodes: Set<string>) => {
    const drains = new Set<string>();
    for (const s of shares) {
      const b = banks.get(s.bankId)!;
      for (const p of b.ports) {
        if (!netNodes.has(`bank:${b.id}/${p.id}`)) continue;
        if (!p.lowVoltageProtected) drains.add(b.id);
      }
    }
    return { lowVoltageProtected: shares.length > 0 && drains.size === 0, drainsBankIds: [...drains] };
  };
  const pickPath = (paths: FeedPath[], shares: BankShare[]): FeedPath | null => {
    const ok = paths.filter((p) => p.supply.kind === "bank" && live.has(`bank:${p.supply.bankId}/${p.supply.portId}`) && p.circuitIds.every((c) => conducting.has(c)));
    const shareOf = (p: FeedPath) => shares.find((s) => p.supply.kind === "bank" && s.bankId === p.supply.bankId)?.share ?? 0;
    ok.sort((a, b) => shareOf(b) - shareOf(a) || a.circuitIds.length - b.circuitIds.length);
    return ok[0] ?? null;
  };
  const sinkFeed = (incoming: Circuit[]): { net: Net | null } => {
    for (const c of incoming) {
      if (!conducting.has(c.id)) continue;
      const n = nodeOf(c.from, "from");
      const net = n ? netOfNode(n) : null;
      if (net) return { net };
    }
    return { net: null };
  };
  const incomingTo = (kind: "load" | "inverter", id: string) => model.circuits.filter((c) => c.to.kind === kind && c.to.id === id);

  const inverters: Solution["inverters"] = {};
  for (const inv of model.inverters) {
    const { net } = sinkFeed(incomingTo("inverter", inv.id));
    const shares = net?.banks ?? [];
    const nodes = new Set(net?.nodes ?? []);
    inverters[inv.id] = {
      on: inverterIdsOn.includes(inv.id),
      powered: !!net && (shares.length > 0 || net.sourceIds.length > 0),
      netId: net?.id ?? null,
      bankShares: shares,
      sourceOnly: !!net && shares.length === 0 && net.sourceIds.length > 0,
      inverterId: null,
      path: pickPath(graph.paths.inverters[inv.id] ?? [], shares),
      ...protectionOf(shares, nodes),
      voltageV: net?.voltageV ?? bankNominalV(model.banks[0]!),
    };
  }

  const loads: Record<string, Feed> = {};
  for (const l of model.loads) {
    const { net } = sinkFeed(incomingTo("load", l.id));
    let feedNet = net;
    let inverterId: string | null = null;
    if (net && net.current === "ac") {
      inverterId = net.acFromInverterIds.find((id) => inverters[id]?.powered && inverters[id]?.on) ?? net.acFromInverterIds[0] ?? null;
      const inv = inverterId ? inverters[inverterId] : undefined;
      feedNet = inv && inv.netId !== null ? nets[inv.netId]! : null;
    }
    const shares = feedNet?.banks ?? [];
    const nodes = new Set(feedNet?.nodes ?? []);
    const invOk = inverterId === null || (inverters[inverterId]?.on ?? false);
    const hasSupply = !!feedNet && (shares.length > 0 || feedNet.sourceIds.length > 0);
    loads[l.id] = {
      powered: hasSupply && invOk && (net?.current !== "ac" || inverterId !== null),
      netId: net?.id ?? null,
      bankShares: shares,
      sourceOnly: !!feedNet && shares.length === 0 && feedNet.sourceIds.length > 0,
      inverterId,
      path: pickPath(graph.paths.loads[l.id] ?? [], shares),
      ...protectionOf(shares, nodes),
      voltageV: feedNet?.voltageV ?? bankNominalV(model.banks.find((b) => b.role === "house") ?? model.banks[0]!),
    };
  }

  const sources: Solution["sources"] = {};
  for (const s of model.sources) {
    const net = netOfNode(`source:${s.id}`);
    sources[s.id] = { netId: net?.id ?? null, bankShares: net?.banks ?? [] };
  }
  const standbyBmsW = Object.values(bms).reduce((a, b) => a + b.standbyW, 0);
  return { positions, at, bms, nets, loads, inverters, sources, unknownChangeovers, loadsOn, inverterIdsOn, standbyBmsW };
}

/** The bank with the largest share, or null. */
export function mainBankId(shares: BankShare[]): string | null {
  let best: BankShare | null = null;
  for (const s of shares) if (!best || s.share > best.share) best = s;
  return best?.bankId ?? null;
}
