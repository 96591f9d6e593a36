/**
 * Draw and the daily energy budget: per load, per bus and per bank, with inverter losses and
 * idle draw, standby of switched-off loads and of the bank's own electronics (always-on and
 * contactor-engaged parts), and the standby share of the day.
 */
import type { Load, Mode, RigModel } from "./model";
import type { CircuitGraph } from "./circuit-graph";
import { bankNominalV } from "./battery";
import { how, r, type How } from "./explain";
import { windowHours } from "./units";

export interface PlanInput {
  modeId: string;
  /** Loads switched on now; absent = the mode's loads. Loads on but not in the mode run all day. */
  loadsOn?: string[];
  /** Inverters on; absent = the mode's. */
  inverterIdsOn?: string[];
}

export interface PlannedLoad {
  load: Load;
  on: boolean;
  hoursPerDay: number;
  windows: { startH: number; endH: number }[] | undefined;
}

export interface LoadBudget {
  loadId: string;
  name: string;
  on: boolean;
  bankId: string | null;
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

export type StandbyKind = "bank-always" | "bank-contactor" | "inverter-idle" | "inverter-off" | "load-standby";

export interface StandbyItem {
  kind: StandbyKind;
  id: string;
  name: string;
  bankId: string | null;
  w: number;
  whPerDay: number;
}

export interface BankBudget {
  bankId: string;
  name: string;
  nominalV: number;
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

export function findMode(model: RigModel, modeId: string): Mode {
  return model.modes.find((m) => m.id === modeId) ?? model.modes[0]!;
}

export function planLoads(model: RigModel, plan: PlanInput): PlannedLoad[] {
  const mode = findMode(model, plan.modeId);
  const entries = new Map(mode.loads.map((l) => [l.loadId, l]));
  const onSet = plan.loadsOn ? new Set(plan.loadsOn) : new Set(mode.loads.filter((l) => l.hoursPerDay > 0).map((l) => l.loadId));
  return model.loads.map((load) => {
    const e = entries.get(load.id);
    const on = onSet.has(load.id);
    if (!on) return { load, on, hoursPerDay: 0, windows: undefined };
    if (!e) return { load, on, hoursPerDay: 24, windows: undefined };
    return { load, on, hoursPerDay: e.hoursPerDay, windows: e.windows?.length ? e.windows : undefined };
  });
}

/**
 * Inverters on: the plan's list when given; otherwise the mode's, plus any inverter that an
 * AC load switched on needs.
 */
export function invertersOn(model: RigModel, plan: PlanInput, graph?: CircuitGraph): Set<string> {
  if (plan.inverterIdsOn) return new Set(plan.inverterIdsOn);
  const on = new Set(findMode(model, plan.modeId).inverterIdsOn);
  if (graph) {
    for (const p of planLoads(model, plan)) {
      if (p.on && p.load.current === "ac") for (const id of graph.loads[p.load.id]?.primary?.inverterIds ?? []) on.add(id);
    }
  }
  return on;
}

/** Voltage of the bank feeding a load (nominal), or the first bank's. */
function feedV(model: RigModel, bankId: string | null): number {
  const b = model.banks.find((x) => x.id === bankId) ?? model.banks[0]!;
  return bankNominalV(b);
}

/** Running power at the device and from the bank. */
export function loadPower(model: RigModel, graph: CircuitGraph, load: Load): { runW: number; bankW: number; bankA: number; bankId: string | null; inverterId: string | null } {
  const lg = graph.loads[load.id];
  const bankId = lg?.bankId ?? null;
  const v = feedV(model, bankId);
  const inverterId = lg?.primary?.inverterIds[0] ?? null;
  const inv = inverterId ? model.inverters.find((i) => i.id === inverterId) : undefined;
  let runW: number;
  if (load.powerW !== undefined) runW = load.powerW;
  else runW = (load.currentA ?? 0) * (load.current === "ac" ? inv?.acNominalV ?? 230 : v);
  const bankW = load.current === "ac" && inv ? runW / (inv.efficiencyPct / 100) : runW;
  return { runW, bankW, bankA: bankW / v, bankId, inverterId };
}

/** Which banks have their load contactor engaged: any load on, or inverter on, fed through it. */
export function engagedContactors(model: RigModel, graph: CircuitGraph, planned: PlannedLoad[], invOn: Set<string>): Set<string> {
  const engaged = new Set<string>();
  for (const p of planned) {
    if (!p.on) continue;
    const lg = graph.loads[p.load.id];
    if (lg?.primary?.needsContactor && lg.bankId) engaged.add(lg.bankId);
  }
  for (const id of invOn) {
    const f = graph.inverters[id];
    if (f?.needsContactor && f.bankId) engaged.add(f.bankId);
  }
  return engaged;
}

/** Whether a load's (or inverter's) supply port is live: non-contactor ports always are. */
function portLive(needsContactor: boolean, bankId: string | null, engaged: Set<string>): boolean {
  return !needsContactor || (bankId !== null && engaged.has(bankId));
}

export function computeBudget(model: RigModel, graph: CircuitGraph, plan: PlanInput): Budget {
  const mode = findMode(model, plan.modeId);
  const planned = planLoads(model, plan);
  const invOn = invertersOn(model, plan, graph);
  const engaged = engagedContactors(model, graph, planned, invOn);

  const loads: LoadBudget[] = [];
  const standby: StandbyItem[] = [];
  for (const p of planned) {
    const { runW, bankW, bankA, bankId, inverterId } = loadPower(model, graph, p.load);
    const duty = (p.load.dutyCyclePct ?? 100) / 100;
    const lg = graph.loads[p.load.id];
    const live = portLive(lg?.primary?.needsContactor ?? false, bankId, engaged) && (inverterId === null || invOn.has(inverterId));
    const standbyW = live ? p.load.standbyW ?? 0 : 0;
    // An AC load cannot run while its inverter is off.
    const runs = p.on && (inverterId === null || invOn.has(inverterId));
    const runWh = runs ? bankW * duty * p.hoursPerDay : 0;
    const standbyWh = standbyW * (24 - p.hoursPerDay);
    const v = feedV(model, bankId);
    loads.push({
      loadId: p.load.id,
      name: p.load.name,
      on: p.on,
      bankId,
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
        "Wh/day = P_bank × duty × hours + P_standby × (24 − hours); P_bank = P / η_inverter for AC",
        { runW: r(runW), bankW: r(bankW), dutyCyclePct: duty * 100, hoursPerDay: p.hoursPerDay, standbyW, bankNominalV: v },
      ),
    });
    if (standbyWh > 0) {
      standby.push({ kind: "load-standby", id: p.load.id, name: `${p.load.name} (standby)`, bankId, w: standbyW, whPerDay: standbyWh });
    }
  }
  for (const b of model.banks) {
    standby.push({ kind: "bank-always", id: b.id, name: `${b.name} electronics`, bankId: b.id, w: b.standbyAlwaysW, whPerDay: b.standbyAlwaysW * 24 });
    if (engaged.has(b.id) && b.standbyContactorW > 0) {
      standby.push({ kind: "bank-contactor", id: b.id, name: `${b.name} load contactor`, bankId: b.id, w: b.standbyContactorW, whPerDay: b.standbyContactorW * 24 });
    }
  }
  for (const inv of model.inverters) {
    const f = graph.inverters[inv.id];
    const bankId = f?.bankId ?? null;
    if (invOn.has(inv.id)) {
      standby.push({ kind: "inverter-idle", id: inv.id, name: `${inv.name} idle`, bankId, w: inv.idleW, whPerDay: inv.idleW * 24 });
    } else if ((inv.offW ?? 0) > 0 && portLive(f?.needsContactor ?? false, bankId, engaged)) {
      standby.push({ kind: "inverter-off", id: inv.id, name: `${inv.name} (off)`, bankId, w: inv.offW ?? 0, whPerDay: (inv.offW ?? 0) * 24 });
    }
  }

  const loadWhPerDay = loads.reduce((s, l) => s + l.runWhPerDay, 0);
  const standbyWhPerDay = standby.reduce((s, x) => s + x.whPerDay, 0);
  const totalWhPerDay = loadWhPerDay + standbyWhPerDay;

  const banks: BankBudget[] = model.banks.map((b) => {
    const v = bankNominalV(b);
    const lw = loads.filter((l) => l.bankId === b.id).reduce((s, l) => s + l.runWhPerDay, 0);
    const sw = standby.filter((x) => x.bankId === b.id).reduce((s, x) => s + x.whPerDay, 0);
    return {
      bankId: b.id, name: b.name, nominalV: v, contactorEngaged: engaged.has(b.id),
      loadWhPerDay: lw, standbyWhPerDay: sw, whPerDay: lw + sw, ahPerDay: (lw + sw) / v, averageW: (lw + sw) / 24,
    };
  });

  const buses = model.buses.map((bus) => {
    const ids = new Set(graph.loadsByBus[bus.id] ?? []);
    const on = loads.filter((l) => ids.has(l.loadId));
    return {
      busId: bus.id,
      name: bus.name,
      runningW: on.filter((l) => l.on).reduce((s, l) => s + l.bankW, 0),
      runningA: on.filter((l) => l.on).reduce((s, l) => s + l.bankA, 0),
      whPerDay: on.reduce((s, l) => s + l.whPerDay, 0),
    };
  });

  return {
    modeId: mode.id,
    modeName: mode.name,
    loads,
    buses,
    standby,
    banks,
    loadWhPerDay,
    standbyWhPerDay,
    totalWhPerDay,
    standbySharePct: totalWhPerDay > 0 ? (100 * standbyWhPerDay) / totalWhPerDay : 0,
    how: how(
      "day = Σ loads (P × duty × hours) + Σ standby (W × hours); standby share = standby / day",
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
  const profiles = new Map<string, Float64Array>();
  for (const b of model.banks) profiles.set(b.id, new Float64Array(PROFILE_SLOTS));
  const planned = planLoads(model, plan);
  const slotH = 24 / PROFILE_SLOTS;
  const constant = new Map<string, number>();
  const addConstant = (bankId: string, w: number) => constant.set(bankId, (constant.get(bankId) ?? 0) + w);
  budget.loads.forEach((lb, i) => {
    const p = planned[i]!;
    const prof = lb.bankId ? profiles.get(lb.bankId) : undefined;
    if (!prof || !lb.bankId) return;
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
        for (let s = 0; s < PROFILE_SLOTS; s++) if (inside[s]) prof[s]! += w;
        addConstant(lb.bankId, lb.standbyWhPerDay / 24);
        return;
      }
    }
    addConstant(lb.bankId, (lb.runWhPerDay + lb.standbyWhPerDay) / 24);
  });
  for (const x of budget.standby) {
    if (x.kind === "load-standby" || !x.bankId) continue;
    addConstant(x.bankId, x.w);
  }
  for (const [bankId, w] of constant) {
    const prof = profiles.get(bankId);
    if (!prof) continue;
    for (let s = 0; s < PROFILE_SLOTS; s++) prof[s]! += w;
  }
  return profiles;
}
