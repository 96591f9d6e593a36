/**
 * Every number on the Now screen, the budget page and the API's present figures, from one
 * place: the projection for a state, the present draw and source power at an instant (the same
 * profiles and source routing the projection uses), the chart series, the night spans and the
 * runway each load costs.
 */
import { bankNominalV, socFromRestingVoltage, usableEnergy, type SocFromVoltage } from "./battery";
import type { CircuitGraph } from "./circuit-graph";
import { drawProfiles, PROFILE_SLOTS } from "./draw";
import type { Bank, RigModel } from "./model";
import type { PlanInput } from "./plan";
import { primaryBank } from "./primary-bank";
import { localHourFn, runProjection, type BankProjection, type Projection, type ProjectionOptions } from "./projection";
import { arrayOutputW, dayOfYear, planeOfArrayWm2, sunEvents, sunPosition } from "./solar";
import type { CurrentState } from "./state";
import { inWindow } from "./units";
import { MS_PER_DAY, MS_PER_H } from "./time";

export interface PresentPower {
  drawW: number;
  sourceW: number;
  solarW: number;
  /** Positive: charging; negative: drawing from the bank. */
  netW: number;
  netA: number;
  bankV: number;
}

export interface NowFigures {
  projection: Projection;
  bank: BankProjection;
  bankModel: Bank;
  cutoffSocPct: number;
  present: PresentPower;
  /** The SoC estimate from a resting voltage, when that is what the state gives. */
  socEstimate: SocFromVoltage | null;
}

export function planOf(s: CurrentState): PlanInput {
  return { modeId: s.modeId, ...(s.loadsOn ? { loadsOn: s.loadsOn } : {}), ...(s.inverterIdsOn ? { inverterIdsOn: s.inverterIdsOn } : {}) };
}

const profileCache = new WeakMap<object, Map<string, Float64Array>>();
/** The engine's draw profiles for a projection's budget (memoised per budget). */
function profilesFor(model: RigModel, graph: CircuitGraph, projection: Projection, s: CurrentState): Map<string, Float64Array> {
  let p = profileCache.get(projection.budget);
  if (!p) {
    p = drawProfiles(model, graph, projection.budget, planOf(s));
    profileCache.set(projection.budget, p);
  }
  return p;
}

function drawAt(profile: Float64Array | undefined, hour: number): number {
  if (!profile) return 0;
  return profile[Math.min(PROFILE_SLOTS - 1, Math.floor((hour / 24) * PROFILE_SLOTS))]!;
}

/** Source power into one bank at an instant: its share of each array and scheduled charger. */
export function sourcesAt(model: RigModel, projection: Projection, s: CurrentState, bank: Bank, ms: number, hour: number): { solarW: number; otherW: number } {
  const mode = model.modes.find((m) => m.id === s.modeId) ?? model.modes[0]!;
  const modeSources = new Map(mode.sources.map((x) => [x.sourceId, x]));
  const place = s.location ?? model.home;
  const sol = projection.budget.solution;
  let solarW = 0;
  let otherW = 0;
  for (const src of model.sources) {
    const route = sol.sources[src.id];
    const share = route?.bankShares.find((x) => x.bankId === bank.id)?.share ?? 0;
    if (share === 0 || route?.netId === null || route?.netId === undefined) continue;
    const v = sol.nets[route.netId]!.voltageV;
    const m = modeSources.get(src.id);
    if (src.kind === "solar") {
      if (m?.enabled === false) continue;
      const sun = sunPosition(ms, place.latDeg, place.lonDeg, { elevationM: place.elevationM ?? 0 });
      const poa = planeOfArrayWm2(sun, dayOfYear(ms), src.tiltDeg, src.azimuthDeg, s.weatherFactor ?? 1).poaWm2;
      solarW += arrayOutputW(src, poa, s.ambientC ?? 20, v).outW * share;
    } else if (m?.enabled && (!m.windows?.length || m.windows.some((w) => inWindow(hour, w.startH, w.endH)))) {
      otherW += src.ratedA * v * share;
    }
  }
  return { solarW, otherW };
}

/** Draw and source power of one bank (default: the primary bank) at an instant, from the projection's own profiles and source routing. */
export function presentPower(model: RigModel, graph: CircuitGraph, s: CurrentState, projection: Projection, atMs: number, bankId = projection.primaryBankId): PresentPower {
  const bankModel = model.banks.find((b) => b.id === bankId)!;
  const profile = profilesFor(model, graph, projection, s).get(bankModel.id);
  const hour = localHourFn(atMs, atMs + 60_000, model.timeZone)(atMs);
  const drawW = drawAt(profile, hour);
  const { solarW, otherW } = sourcesAt(model, projection, s, bankModel, atMs, hour);
  const v = bankNominalV(bankModel);
  const netW = solarW + otherW - drawW;
  return { drawW, sourceW: solarW + otherW, solarW, netW, netA: netW / v, bankV: v };
}

/** The projection and the present figures of the primary bank for one state at `atMs`. */
export function nowFigures(model: RigModel, graph: CircuitGraph, s: CurrentState, atMs: number, options: ProjectionOptions = {}): NowFigures {
  const projection = runProjection(model, graph, s, options);
  const bank = projection.banks.find((b) => b.bankId === projection.primaryBankId)!;
  const bankModel = model.banks.find((b) => b.id === bank.bankId)!;
  const entry = s.banks.find((b) => b.bankId === bankModel.id);
  return {
    projection,
    bank,
    bankModel,
    cutoffSocPct: usableEnergy(bankModel, bank.startSocPct).cutoffSocPct,
    present: presentPower(model, graph, s, projection, atMs),
    socEstimate: entry?.socPct === undefined && entry?.restingV !== undefined ? socFromRestingVoltage(bankModel, entry.restingV) : null,
  };
}

export interface ChartSeries {
  /** Seconds (uPlot's x unit). */
  t: number[];
  socPct: number[];
  drawW: number[];
  solarW: number[];
  stopSocPct: number;
  cutoffSocPct: number;
  /** Night spans [sunset, sunrise] in seconds. */
  nights: Array<[number, number]>;
  runwayEnd: number | null;
}

const nightCache = new Map<string, Array<[number, number]>>();

/** Night spans (sunset → sunrise) over [startMs, endMs], in seconds, memoised per place and span. */
export function nightSpans(place: { latDeg: number; lonDeg: number }, startMs: number, endMs: number): Array<[number, number]> {
  const key = `${place.latDeg}|${place.lonDeg}|${startMs}|${endMs}`;
  const hit = nightCache.get(key);
  if (hit) return hit;
  const nights: Array<[number, number]> = [];
  let prevSet: number | null = null;
  const days = Math.ceil((endMs - startMs) / MS_PER_DAY);
  for (let d = -1; d <= days + 1; d++) {
    const from = startMs + d * MS_PER_DAY - MS_PER_DAY / 2;
    const ev = sunEvents(from, from + MS_PER_DAY, place.latDeg, place.lonDeg);
    if (ev.sunriseMs !== null && prevSet !== null && ev.sunriseMs > prevSet) {
      const a = Math.max(prevSet, startMs), b = Math.min(ev.sunriseMs, endMs);
      if (b > a && !nights.some(([x]) => Math.abs(x - a / 1000) < 60)) nights.push([a / 1000, b / 1000]);
    }
    if (ev.sunsetMs !== null) prevSet = ev.sunsetMs;
  }
  if (nightCache.size > 20) nightCache.clear();
  nightCache.set(key, nights);
  return nights;
}

/** Chart series every `everyMin` minutes over the projection. */
export function chartSeries(model: RigModel, graph: CircuitGraph, s: CurrentState, now: NowFigures, everyMin = 15): ChartSeries {
  const p = now.projection;
  const stride = Math.max(1, Math.round(everyMin / p.stepMin));
  const idx: number[] = [];
  for (let i = 0; i < p.timesMs.length; i += stride) idx.push(i);
  const t = idx.map((i) => p.timesMs[i]! / 1000);
  const endMs = p.timesMs[p.timesMs.length - 1]!;
  const hourOf = localHourFn(p.startMs, endMs, model.timeZone);
  const profile = profilesFor(model, graph, p, s).get(now.bankModel.id);
  const drawW = idx.map((i) => drawAt(profile, hourOf(p.timesMs[i]!)));
  const solarW = idx.map((i) => {
    const ms = p.timesMs[i]!;
    const x = sourcesAt(model, p, s, now.bankModel, ms, hourOf(ms));
    return x.solarW + x.otherW;
  });
  return {
    t,
    socPct: idx.map((i) => now.bank.socPct[i]!),
    drawW,
    solarW,
    stopSocPct: now.bank.stopSocPct,
    cutoffSocPct: now.cutoffSocPct,
    nights: nightSpans(s.location ?? model.home, p.startMs, endMs),
    runwayEnd: now.bank.runwayH === null ? null : (p.startMs + now.bank.runwayH * MS_PER_H) / 1000,
  };
}

export interface LoadCost {
  loadId: string;
  /** Runway with the load on minus runway with it off, hours (negative: it shortens the runway). Null when the runway passes the horizon either way. */
  deltaH: number | null;
  /** Runway with this load switched the other way (null: beyond the horizon). */
  otherRunwayH: number | null;
}

const baseCache = new WeakMap<object, number | null>();

/**
 * What a load costs in runway: the projection re-run (15-minute steps) with that one load
 * switched the other way, against the same coarse projection of the state as it is.
 * `graphFor` gives the graph for a set of loads on (switch positions follow the loads).
 */
export function loadRunwayCost(model: RigModel, graph: CircuitGraph, s: CurrentState, loadId: string, base?: Projection): LoadCost {
  const on = new Set(s.loadsOn ?? []);
  const wasOn = on.has(loadId);
  if (wasOn) on.delete(loadId);
  else on.add(loadId);
  const alt = runProjection(model, graph, { ...s, loadsOn: [...on] }, { stepMin: 15 });
  const altRunway = alt.banks.find((b) => b.bankId === alt.primaryBankId)?.runwayH ?? null;
  const key = base ?? s;
  let baseRunway: number | null;
  if (baseCache.has(key)) baseRunway = baseCache.get(key)!;
  else {
    const p = runProjection(model, graph, s, { stepMin: 15 });
    baseRunway = p.banks.find((b) => b.bankId === p.primaryBankId)?.runwayH ?? null;
    baseCache.set(key, baseRunway);
  }
  const withH = wasOn ? baseRunway : altRunway;
  const withoutH = wasOn ? altRunway : baseRunway;
  const deltaH = withH === null && withoutH === null ? null : (withH ?? alt.horizonH) - (withoutH ?? alt.horizonH);
  return { loadId, deltaH, otherRunwayH: altRunway };
}

export { primaryBank };
