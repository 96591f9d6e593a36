/**
 * Draw and the daily energy budget: per load, per bus and per bank, with inverter losses and
 * idle draw, standby of switched-off loads and of the bank's own electronics (always-on and
 * contactor-engaged parts), and the standby share of the day.
 */
import type { Load, RigModel } from "./model";
import type { CircuitGraph } from "./circuit-graph";
import { bankNominalV } from "./battery";
import { how, r, type How } from "./explain";
import { windowHours } from "./units";
import { findMode, planLoads, type PlanInput, type PlannedLoad } from "./plan";
import { mainBankId, solveState, type BankShare, type Solution } from "./solution";

export { findMode, planLoads, type PlanInput, type PlannedLoad };

export interface LoadBudget {
  loadId: string;
  name: string;
  on: boolean;
  /** Some bank or source feeds it in the present positions. */
  powered: boolean;
  /** The bank with the largest share (null: none feeds it). */
  bankId: string | null;
  /** How its draw splits between the banks on its net. */
  bankShares: BankShare[];
  hoursPerDay: number;
  /** Power at the device while running (AC side for AC loads). */
  runW: number;
  /** Power drawn from the bank while running (through the inverter's efficiency for AC). */
  bankW: number;
  /** Current at the bank's nominal voltage while running. */
  bankA: number;
  dutyCyclePct: number;
  /** Energy while on: bankW × duty × hours. */
  runWhPerDay: number;
  /** Standby while off (and while off during the day). */
  standbyWhPerDay: number;
  whPerDay: number;
  ahPerDay: number;
  how: How;
}

export type StandbyKind = "bank-bms" | "inverter-idle" | "inverter-off" | "load-standby";

export interface StandbyItem {
  kind: StandbyKind;
  id: string;
  name: string;
  bankId: string | null;
  bankShares: BankShare[];
  w: number;
  whPerDay: number;
}

export interface BankBudget {
  bankId: string;
  name: string;
  nominalV: number;
  /** The BMS state in the present positions (null: no BMS). */
  bmsStateId: string | null;
  bmsStateName: string;
  /** A BMS port that is not live in the resting state is live now (load output engaged). */
  contactorEngaged: boolean;
  loadWhPerDay: number;
  standbyWhPerDay: number;
  whPerDay: number;
  ahPerDay: number;
  /** Average draw over the day. */
  averageW: number;
}

export interface Budget {
  modeId: string;
  /** The electrical solution the budget was computed for (positions, BMS states, nets). */
  solution: Solution;
  modeName: string;
  loads: LoadBudget[];
  buses: { busId: string; name: string; runningW: number; runningA: number; whPerDay: number }[];
  standby: StandbyItem[];
  banks: BankBudget[];
  loadWhPerDay: number;
  standbyWhPerDay: number;
  totalWhPerDay: number;
  standbySharePct: number;
  how: How;
}

/**
 * Inverters on: the plan's list when given; otherwise the mode's, plus any inverter that an
 * AC load switched on needs.
 */
export function invertersOn(model: RigModel, plan: PlanInput, graph: CircuitGraph): Set<string> {
  return new Set(solveState(model, graph, plan).inverterIdsOn);
}

/** Running power at the device and from the bank. */
export function loadPower(model: RigModel, graph: CircuitGraph, load: Load, plan?: PlanInput): { runW: number; bankW: number; bankA: number; bankId: string | null; inverterId: string | null; voltageV: number } {
  const sol = solveState(model, graph, plan ?? { modeId: model.modes[0]!.id });
  const feed = sol.loads[load.id];
  const bankId = feed ? mainBankId(feed.bankShares) : null;
  const v = feed?.voltageV ?? bankNominalV(model.banks[0]!);
  const inverterId = feed?.inverterId ?? graph.paths.loads[load.id]?.[0]?.inverterIds[0] ?? null;
  const inv = inverterId ? model.inverters.find((i) => i.id === inverterId) : undefined;
  let runW: number;
  if (load.powerW !== undefined) runW = load.powerW;
  else runW = (load.currentA ?? 0) * (load.current === "ac" ? inv?.acNominalV ?? 230 : v);
  const bankW = load.current === "ac" && inv ? runW / (inv.efficiencyPct / 100) : runW;
  return { runW, bankW, bankA: bankW / v, bankId, inverterId, voltageV: v };
}

export function computeBudget(model: RigModel, graph: CircuitGraph, plan: PlanInput): Budget {
  const mode = findMode(model, plan.modeId);
  const sol = solveState(model, graph, plan);
  const planned = planLoads(model, plan);
  const invOn = new Set(sol.inverterIdsOn);

  const loads: LoadBudget[] = [];
  const standby: StandbyItem[] = [];
  for (const p of planned) {
    const feed = sol.loads[p.load.id]!;
    const { runW, bankW, bankA, bankId, voltageV: v } = loadPower(model, graph, p.load, plan);
    const duty = (p.load.dutyCyclePct ?? 100) / 100;
    const live = feed.powered && feed.bankShares.length > 0;
    const standbyW = live ? p.load.standbyW ?? 0 : 0;
    const runs = p.on && live;
    const runWh = runs ? bankW * duty * p.hoursPerDay : 0;
    const standbyWh = standbyW * (24 - p.hoursPerDay);
    loads.push({
      loadId: p.load.id,
      name: p.load.name,
      on: p.on,
      powered: feed.powered,
      bankId,
      bankShares: feed.bankShares,
      hoursPerDay: p.hoursPerDay,
      runW,
      bankW,
      bankA,
      dutyCyclePct: duty * 100,
      runWhPerDay: runWh,
      standbyWhPerDay: standbyWh,
      whPerDay: runWh + standbyWh,
      ahPerDay: (runWh + standbyWh) / v,
      how: how(
        "Wh/day = P_bank × duty × hours + P_standby × (24 − hours); P_bank = P / η_inverter for AC; split between paralleled banks by share",
        { runW: r(runW), bankW: r(bankW), dutyCyclePct: duty * 100, hoursPerDay: p.hoursPerDay, standbyW, bankNominalV: v, banks: feed.bankShares.map((s) => `${s.bankId} ${r(100 * s.share, 1)} %`).join(", ") || "none" },
        feed.powered ? undefined : "Not powered in the present switch positions.",
      ),
    });
    if (standbyWh > 0) {
      standby.push({ kind: "load-standby", id: p.load.id, name: `${p.load.name} (standby)`, bankId, bankShares: feed.bankShares, w: standbyW, whPerDay: standbyWh });
    }
  }
  for (const b of model.banks) {
    const st = sol.bms[b.id]!;
    const own = [{ bankId: b.id, portId: b.ports[0]!.id, share: 1 }];
    if (b.bms) standby.push({ kind: "bank-bms", id: b.id, name: `${b.bms.name} (${st.stateName.toLowerCase()})`, bankId: b.id, bankShares: own, w: st.standbyW, whPerDay: st.standbyW * 24 });
  }
  for (const inv of model.inverters) {
    const f = sol.inverters[inv.id]!;
    const bankId = mainBankId(f.bankShares);
    const live = f.powered && f.bankShares.length > 0;
    if (invOn.has(inv.id) && live) {
      standby.push({ kind: "inverter-idle", id: inv.id, name: `${inv.name} idle`, bankId, bankShares: f.bankShares, w: inv.idleW, whPerDay: inv.idleW * 24 });
    } else if (!invOn.has(inv.id) && (inv.offW ?? 0) > 0 && live) {
      standby.push({ kind: "inverter-off", id: inv.id, name: `${inv.name} (off)`, bankId, bankShares: f.bankShares, w: inv.offW ?? 0, whPerDay: (inv.offW ?? 0) * 24 });
    }
  }

  const loadWhPerDay = loads.reduce((s, l) => s + l.runWhPerDay, 0);
  const standbyWhPerDay = standby.reduce((s, x) => s + x.whPerDay, 0);
  const totalWhPerDay = loadWhPerDay + standbyWhPerDay;
  const shareOf = (shares: BankShare[], bankId: string) => shares.find((s) => s.bankId === bankId)?.share ?? 0;

  const banks: BankBudget[] = model.banks.map((b) => {
    const v = bankNominalV(b);
    const lw = loads.reduce((s, l) => s + l.runWhPerDay * shareOf(l.bankShares, b.id), 0);
    const sw = standby.reduce((s, x) => s + x.whPerDay * shareOf(x.bankShares, b.id), 0);
    const st = sol.bms[b.id]!;
    const resting = b.bms?.states[0]!.livePorts ?? [];
    return {
      bankId: b.id, name: b.name, nominalV: v, bmsStateId: st.stateId, bmsStateName: st.stateName,
      contactorEngaged: !!b.bms && st.livePorts.some((p) => !resting.includes(p)),
      loadWhPerDay: lw, standbyWhPerDay: sw, whPerDay: lw + sw, ahPerDay: (lw + sw) / v, averageW: (lw + sw) / 24,
    };
  });

  const buses = model.buses.map((bus) => {
    const net = sol.nets.find((n) => n.nodes.includes(`bus:${bus.id}`));
    const on = loads.filter((l) => sol.loads[l.loadId]?.netId === net?.id && net !== undefined && graph.paths.loads[l.loadId]?.some((p) => p.via.some((v) => v.kind === "bus" && v.id === bus.id)));
    return {
      busId: bus.id,
      name: bus.name,
      runningW: on.filter((l) => l.on && l.powered).reduce((s, l) => s + l.bankW, 0),
      runningA: on.filter((l) => l.on && l.powered).reduce((s, l) => s + l.bankA, 0),
      whPerDay: on.reduce((s, l) => s + l.whPerDay, 0),
    };
  });

  return {
    modeId: mode.id,
    modeName: mode.name,
    solution: sol,
    loads,
    buses,
    standby,
    banks,
    loadWhPerDay,
    standbyWhPerDay,
    totalWhPerDay,
    standbySharePct: totalWhPerDay > 0 ? (100 * standbyWhPerDay) / totalWhPerDay : 0,
    how: how(
      "day = Σ loads (P × duty × hours) + Σ standby (W × hours, BMS by its state); a bank's part = Σ share × Wh",
      { loadWhPerDay: r(loadWhPerDay, 1), standbyWhPerDay: r(standbyWhPerDay, 1), mode: mode.name },
    ),
  };
}

/** Slots per day in the draw profile (5-minute resolution). */
export const PROFILE_SLOTS = 288;

/**
 * Average draw per bank for each 5-minute slot of a local day, consistent with the budget:
 * the sum over slots × 5 min equals the budget's Wh/day per bank.
 */
export function drawProfiles(model: RigModel, graph: CircuitGraph, budget: Budget, plan: PlanInput): Map<string, Float64Array> {
  void graph;
  const profiles = new Map<string, Float64Array>();
  for (const b of model.banks) profiles.set(b.id, new Float64Array(PROFILE_SLOTS));
  const planned = planLoads(model, plan);
  const slotH = 24 / PROFILE_SLOTS;
  const constant = new Map<string, number>();
  const addConstant = (shares: BankShare[], w: number) => {
    for (const s of shares) constant.set(s.bankId, (constant.get(s.bankId) ?? 0) + w * s.share);
  };
  budget.loads.forEach((lb, i) => {
    const p = planned[i]!;
    if (lb.bankShares.length === 0) return;
    if (lb.runWhPerDay > 0 && p.windows) {
      // Slots whose midpoint lies in a window.
      const inside = new Uint8Array(PROFILE_SLOTS);
      let count = 0;
      for (const w of p.windows) {
        const a = Math.ceil(w.startH / slotH - 0.5);
        const len = Math.round(windowHours(w.startH, w.endH) / slotH);
        for (let j = 0; j < len && j < PROFILE_SLOTS; j++) {
          const s = (a + j) % PROFILE_SLOTS;
          if (!inside[s]) { inside[s] = 1; count++; }
        }
      }
      if (count > 0) {
        const w = lb.runWhPerDay / (count * slotH);
        for (const sh of lb.bankShares) {
          const prof = profiles.get(sh.bankId)!;
          for (let s = 0; s < PROFILE_SLOTS; s++) if (inside[s]) prof[s]! += w * sh.share;
        }
        addConstant(lb.bankShares, lb.standbyWhPerDay / 24);
        return;
      }
    }
    addConstant(lb.bankShares, (lb.runWhPerDay + lb.standbyWhPerDay) / 24);
  });
  for (const x of budget.standby) {
    if (x.kind === "load-standby") continue;
    addConstant(x.bankShares, x.w);
  }
  for (const [bankId, w] of constant) {
    const prof = profiles.get(bankId);
    if (!prof) continue;
    for (let s = 0; s < PROFILE_SLOTS; s++) prof[s]! += w;
  }
  return profiles;
}
