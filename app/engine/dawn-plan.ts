/**
 * The dawn plan: when the till-dawn verdict falls short, the smallest set of loads to switch
 * off (or hours to halve), essential loads kept, that makes the primary bank reach the next
 * charge with the margin the owner sets.
 *
 * Actions: for each non-essential load on, "off" (gives up its hours per day) or "halve" (gives
 * up half of them). Comfort lost = hours of use per day given up, summed. Each action's value
 * is the energy it saves the primary bank before the next charge (its draw profile integrated
 * from now to the window); candidates are ranked by estimated runway gained per hour of comfort
 * lost (saved Wh ÷ the bank's average draw before the window, ÷ hours given up).
 *
 * Search: with at most EXACT_LIMIT candidate loads, every combination (keep / halve / off per
 * load) is tried in order of comfort lost, each checked with the full projection (15-minute
 * steps); the first that passes is the plan — exact for that action set. With more loads, a
 * greedy pass adds the best-ranked actions until the estimated saving covers the shortfall,
 * then checks with the projection and adds more until it passes (fast: few projections).
 */
import type { RigModel } from "./model";
import type { CircuitGraph } from "./circuit-graph";
import { bankCapacityWh } from "./battery";
import { computeBudget, planLoads } from "./draw";
import { how, r, type How } from "./explain";
import { localHourFn, runProjection, type BankProjection } from "./projection";
import { solveState } from "./solution";
import type { CurrentState } from "./state";
import { inWindow } from "./units";

export const EXACT_LIMIT = 6;

export interface DawnAction {
  /** A load id, or an inverter id for kind "inverter-off". */
  loadId: string;
  name: string;
  /** off / halve a load; inverter-off: the inverter and the AC loads behind it off. */
  kind: "off" | "halve" | "inverter-off";
  /** Hours of use per day given up. */
  comfortLostH: number;
  /** Energy saved to the primary bank between now and the next charge, Wh (estimate). */
  savedWh: number;
  /** Estimated runway gained per hour of comfort lost. */
  runwayGainPerComfortH: number;
}

export interface DawnPlan {
  /** The verdict already passes with the margin: nothing to do. */
  needed: boolean;
  /** A plan was found that passes. */
  found: boolean;
  method: "exact" | "greedy";
  marginSocPct: number;
  before: { reaches: boolean; marginSocPct: number | null; runwayH: number | null };
  after: { reaches: boolean; marginSocPct: number | null; runwayH: number | null } | null;
  actions: DawnAction[];
  comfortLostH: number;
  /** Every candidate action, best first. */
  ranked: DawnAction[];
  /** Loads to switch off for the one-tap suggestion (the "off" actions). */
  switchOff: string[];
  /** Inverters to switch off (their AC loads go off with them). */
  invertersOff: string[];
  projectionsRun: number;
  how: How;
}

type Verdict = { pass: boolean; reaches: boolean; marginSocPct: number | null; runwayH: number | null };

function verdictOf(b: BankProjection, margin: number): Verdict {
  const td = b.tillDawn;
  const pass = td.nextWindowMs === null ? b.runwayH === null : td.reaches && (td.marginSocPct ?? 0) >= margin;
  return { pass, reaches: td.reaches, marginSocPct: td.marginSocPct, runwayH: b.runwayH };
}

/** The plan for a state (the graph built for its positions). Pure; never reads the clock. */
export function planForDawn(model: RigModel, graph: CircuitGraph, state: CurrentState, opts: { marginSocPct?: number; stepMin?: number; horizonH?: number } = {}): DawnPlan {
  const margin = opts.marginSocPct ?? 0;
  const stepMin = opts.stepMin ?? 15;
  let horizonH = opts.horizonH ?? 72;
  const planned = planLoads(model, { modeId: state.modeId, ...(state.loadsOn ? { loadsOn: state.loadsOn } : {}) });
  const loadsOn = planned.filter((p) => p.on).map((p) => p.load.id);
  let projectionsRun = 0;

  const invOn = solveState(model, graph, { modeId: state.modeId, loadsOn, ...(state.inverterIdsOn ? { inverterIdsOn: state.inverterIdsOn } : {}) }).inverterIdsOn;
  const acBehind = (invId: string) => loadsOn.filter((id) => (graph.paths.loads[id] ?? []).some((p) => p.inverterIds.includes(invId)));
  const evaluate = (offIn: Set<string>, halve: Set<string>): { v: Verdict; b: BankProjection } => {
    projectionsRun++;
    const off = new Set(offIn);
    const invOff = new Set([...offIn].filter((id) => invOn.includes(id)));
    for (const inv of invOff) for (const id of acBehind(inv)) off.add(id);
    const m = halve.size === 0 ? model : {
      ...model,
      modes: model.modes.map((mo) => (mo.id !== state.modeId ? mo : { ...mo, loads: mo.loads.map((l) => (halve.has(l.loadId) ? { ...l, hoursPerDay: l.hoursPerDay / 2 } : l)) })),
    };
    const inverters = invOff.size ? { inverterIdsOn: invOn.filter((id) => !invOff.has(id)) } : {};
    const p = runProjection(m, graph, { ...state, ...inverters, loadsOn: loadsOn.filter((id) => !off.has(id)) }, { stepMin, horizonH });
    const b = p.banks.find((x) => x.bankId === p.primaryBankId)!;
    return { v: verdictOf(b, margin), b };
  };

  const base = evaluate(new Set(), new Set());
  const before = { reaches: base.v.reaches, marginSocPct: base.v.marginSocPct, runwayH: base.v.runwayH };
  const empty = (needed: boolean, method: DawnPlan["method"], ranked: DawnAction[]): DawnPlan => ({
    needed, found: !needed, method, marginSocPct: margin, before, after: needed ? null : before, actions: [], comfortLostH: 0, ranked, switchOff: [], invertersOff: [], projectionsRun,
    how: how("no action: the verdict passes with the margin", { marginSocPct: margin }),
  });
  if (base.v.pass) return empty(false, "exact", []);
  // Later checks only need to reach the next charge (and a little past it).
  if (base.b.tillDawn.nextWindowMs !== null) horizonH = Math.min(horizonH, Math.ceil((base.b.tillDawn.nextWindowMs - Date.parse(state.dateTime)) / 3_600_000) + 2);

  // Saved energy per load before the window, from the budget's shares and the load's hours.
  const budget = computeBudget(model, graph, { modeId: state.modeId, loadsOn });
  const primaryId = base.b.bankId;
  const startMs = Date.parse(state.dateTime);
  const endMs = base.b.tillDawn.nextWindowMs ?? startMs + (opts.horizonH ?? 72) * 3_600_000;
  const spanH = Math.max(stepMin / 60, (endMs - startMs) / 3_600_000);
  const hourOf = localHourFn(startMs, endMs + 1, model.timeZone);
  const avgDrawW = Math.max(1e-6, budget.banks.find((b) => b.bankId === primaryId)!.averageW);
  const candidates = planned.filter((p) => p.on && !p.load.essential && p.hoursPerDay > 0);
  const ranked: DawnAction[] = [];
  for (const p of candidates) {
    const lb = budget.loads.find((l) => l.loadId === p.load.id)!;
    const share = lb.bankShares.find((s) => s.bankId === primaryId)?.share ?? 0;
    if (share === 0 || lb.runWhPerDay <= 0) continue;
    let saved = 0;
    if (p.windows) {
      const wPerH = lb.runWhPerDay / p.hoursPerDay;
      const dt = 5 / 60;
      for (let t = startMs; t < endMs; t += 300_000) {
        const h = hourOf(t + 150_000);
        if (p.windows.some((w) => inWindow(h, w.startH, w.endH))) saved += wPerH * dt;
      }
    } else saved = (lb.runWhPerDay / 24) * spanH;
    saved *= share;
    for (const kind of ["off", "halve"] as const) {
      if (kind === "halve" && p.hoursPerDay >= 24) continue;
      const comfort = kind === "off" ? p.hoursPerDay : p.hoursPerDay / 2;
      const s = kind === "off" ? saved : saved / 2;
      ranked.push({ loadId: p.load.id, name: p.load.name, kind, comfortLostH: comfort, savedWh: s, runwayGainPerComfortH: s / avgDrawW / Math.max(comfort, 1e-6) });
    }
  }
  // Inverters whose AC loads are all non-essential: off saves their idle draw too.
  for (const invId of invOn) {
    const inv = model.inverters.find((x) => x.id === invId);
    const f = budget.solution.inverters[invId];
    if (!inv || !f) continue;
    const behind = acBehind(invId);
    if (behind.some((id) => model.loads.find((l) => l.id === id)?.essential)) continue;
    const share = f.bankShares.find((x) => x.bankId === primaryId)?.share ?? 0;
    if (share === 0) continue;
    const acSaved = ranked.filter((a) => a.kind === "off" && behind.includes(a.loadId)).reduce((sum, a) => sum + a.savedWh, 0);
    const comfort = planned.filter((p) => behind.includes(p.load.id)).reduce((sum, p) => sum + p.hoursPerDay, 0);
    const savedWh = (inv.idleW - (inv.offW ?? 0)) * spanH * share + acSaved;
    ranked.push({ loadId: invId, name: `${inv.name} (and its AC loads)`, kind: "inverter-off", comfortLostH: comfort, savedWh, runwayGainPerComfortH: savedWh / avgDrawW / Math.max(comfort, 0.1) });
  }
  ranked.sort((a, b) => b.runwayGainPerComfortH - a.runwayGainPerComfortH || b.savedWh - a.savedWh);
  const loadIds = [...new Set(ranked.map((a) => a.loadId))];

  const finish = (chosen: DawnAction[], v: Verdict | null, method: DawnPlan["method"]): DawnPlan => {
    const found = !!v?.pass;
    return {
      needed: true, found, method, marginSocPct: margin, before,
      after: v ? { reaches: v.reaches, marginSocPct: v.marginSocPct, runwayH: v.runwayH } : null,
      actions: found ? chosen : [], comfortLostH: found ? chosen.reduce((s, a) => s + a.comfortLostH, 0) : 0,
      ranked, switchOff: found ? chosen.filter((a) => a.kind === "off").map((a) => a.loadId) : [],
      invertersOff: found ? chosen.filter((a) => a.kind === "inverter-off").map((a) => a.loadId) : [], projectionsRun,
      how: how(
        method === "exact"
          ? "every combination of keep / halve / off over the non-essential loads on, in order of hours of use given up, checked with the projection; the first that reaches the next charge with the margin"
          : "actions ranked by runway gained per hour given up (saved Wh before the next charge ÷ average draw ÷ hours); added until the saving covers the shortfall, then checked with the projection",
        { candidates: loadIds.length, marginSocPct: margin, projections: projectionsRun, averageDrawW: r(avgDrawW, 1), spanToChargeH: r(spanH, 2) },
        found ? undefined : "No set of non-essential loads is enough: essential loads alone fall short. Charge sooner or lower the margin.",
      ),
    };
  };

  if (loadIds.length <= EXACT_LIMIT) {
    // 0 keep, 1 halve, 2 off — every combination, by comfort lost.
    const opts = loadIds.map((id) => [null, ranked.find((a) => a.loadId === id && a.kind === "halve") ?? null, ranked.find((a) => a.loadId === id && a.kind !== "halve")!] as const);
    const combos: { acts: DawnAction[]; comfort: number; saved: number }[] = [];
    const total = 3 ** loadIds.length;
    for (let code = 1; code < total; code++) {
      let c = code;
      const acts: DawnAction[] = [];
      let ok = true;
      for (let i = 0; i < loadIds.length; i++) {
        const choice = c % 3;
        c = Math.floor(c / 3);
        if (choice === 0) continue;
        const a = opts[i]![choice];
        if (!a) { ok = false; break; }
        acts.push(a);
      }
      if (!ok) continue;
      combos.push({ acts, comfort: acts.reduce((s, a) => s + a.comfortLostH, 0), saved: acts.reduce((s, a) => s + a.savedWh, 0) });
    }
    combos.sort((a, b) => a.comfort - b.comfort || b.saved - a.saved);
    for (const cmb of combos) {
      const off = new Set(cmb.acts.filter((a) => a.kind !== "halve").map((a) => a.loadId));
      const half = new Set(cmb.acts.filter((a) => a.kind === "halve").map((a) => a.loadId));
      const { v } = evaluate(off, half);
      if (v.pass) return finish(cmb.acts, v, "exact");
    }
    return finish([], null, "exact");
  }

  // Greedy for large rigs: estimate the shortfall from the base projection. Once a set passes,
  // drop its lowest-ranked actions while it still passes (a few more projections, binary steps).
  let lastPassing: Verdict | null = null;
  const prune = (acts: DawnAction[], v: Verdict): DawnAction[] => {
    lastPassing = v;
    let keep = acts;
    let step = Math.floor(acts.length / 2);
    while (step >= 1 && projectionsRun < 12) {
      const trial = keep.slice(0, keep.length - step);
      if (trial.length === 0) { step = Math.floor(step / 2); continue; }
      const r = evaluate(new Set(trial.filter((x) => x.kind !== "halve").map((x) => x.loadId)), new Set(trial.filter((x) => x.kind === "halve").map((x) => x.loadId))).v;
      if (r.pass) { keep = trial; lastPassing = r; } else step = Math.floor(step / 2);
    }
    return keep;
  };
  const capWh = bankCapacityWh(model.banks.find((b) => b.id === primaryId)!);
  const runwayH = base.b.runwayH ?? spanH;
  const shortfallWh = Math.max(0, spanH - runwayH) * avgDrawW + (margin / 100) * capWh;
  const chosen: DawnAction[] = [];
  const taken = new Set<string>();
  let savedSum = 0;
  let last: Verdict | null = null;
  // Prefer "off" over "halve" for one load only if it ranks higher; never both.
  const queue = [...ranked];
  const check = (acts: DawnAction[]) => evaluate(new Set(acts.filter((x) => x.kind !== "halve").map((x) => x.loadId)), new Set(acts.filter((x) => x.kind === "halve").map((x) => x.loadId))).v;
  let checkedAt = -1;
  while (queue.length) {
    const a = queue.shift()!;
    if (taken.has(a.loadId)) continue;
    taken.add(a.loadId);
    chosen.push(a);
    savedSum += a.savedWh;
    if (savedSum < shortfallWh) continue;
    last = check(chosen);
    checkedAt = chosen.length;
    if (last.pass) return finish(prune(chosen, last), lastPassing ?? last, "greedy");
  }
  if (checkedAt !== chosen.length && chosen.length) {
    last = check(chosen);
    if (last.pass) return finish(prune(chosen, last), lastPassing ?? last, "greedy");
  }
  // Everything halved or off was not enough: try all off.
  const allOffActs = loadIds.map((id) => ranked.find((a) => a.loadId === id && a.kind !== "halve")!);
  last = check(allOffActs);
  if (last.pass) return finish(prune(allOffActs, last), lastPassing ?? last, "greedy");
  return finish([], null, "greedy");
}
