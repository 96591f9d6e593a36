/**
 * The Now screen's bridge to the engine: turns the shared rig state into the engine's
 * CurrentState and runs the engine. It computes nothing of its own beyond picking values out
 * of engine results; every number shown comes from app/engine.
 */
import { bankNominalV, socFromRestingVoltage, usableEnergy, type SocFromVoltage } from "~/engine/battery";
import { buildCircuitGraph, type CircuitGraph, type LoadGraph, type SwitchStep } from "~/engine/circuit-graph";
import { drawProfiles, PROFILE_SLOTS, type PlanInput } from "~/engine/draw";
import type { Bank, RigModel } from "~/engine/model";
import { localHourFn, runProjection, type BankProjection, type Projection } from "~/engine/projection";
import { arrayOutputW, dayOfYear, planeOfArrayWm2, sunEvents, sunPosition } from "~/engine/solar";
import type { CurrentState } from "~/engine/state";
import { inWindow } from "~/engine/units";
import { effectiveLoadsOn, weatherFactor, type RigState } from "~/schemas/rig-state";

export interface NowInput {
  model: RigModel;
  state: RigState;
  /** The instant to plan from (default now). */
  atMs: number;
}

/** The rig's house bank (the engine's primary bank rule: first house bank, else the first). */
export function primaryBank(model: RigModel): Bank {
  return model.banks.find((b) => b.role === "house") ?? model.banks[0]!;
}

export function placeOf(model: RigModel, state: RigState): { latDeg: number; lonDeg: number; elevationM?: number; label: string } {
  if (state.place.kind === "home") return { ...model.home, label: "the rig's home" };
  return {
    latDeg: state.place.latDeg,
    lonDeg: state.place.lonDeg,
    label: state.place.kind === "device" ? "this phone's location" : "the typed position",
  };
}

const graphCache = new WeakMap<RigModel, Map<string, CircuitGraph>>();
/** Circuit graph for a model and switch positions (memoised: the graph changes only with them). */
export function graphFor(model: RigModel, positions: Record<string, string>): CircuitGraph {
  let byPositions = graphCache.get(model);
  if (!byPositions) graphCache.set(model, (byPositions = new Map()));
  const key = JSON.stringify(positions);
  let g = byPositions.get(key);
  if (!g) {
    g = buildCircuitGraph(model, positions);
    byPositions.set(key, g);
  }
  return g;
}

/** Switches on a load's switch path that someone has set to another position than it needs. */
export function blockedSteps(lg: LoadGraph | undefined, positions: Record<string, string>): SwitchStep[] {
  return (lg?.switchPath ?? []).filter((s) => positions[s.deviceId] !== undefined && positions[s.deviceId] !== s.position);
}

export function toEngineState(model: RigModel, state: RigState, atMs: number, extra?: { loadsOn?: string[] }): CurrentState {
  const bank = primaryBank(model);
  const graph = graphFor(model, state.positions);
  const on = effectiveLoadsOn(model, state.modeId, state.switches);
  const loadsOn = extra?.loadsOn ?? [...on].filter((id) => blockedSteps(graph.loads[id], state.positions).length === 0);
  const soc = state.soc;
  const place = state.place.kind === "home" ? undefined : { latDeg: state.place.latDeg, lonDeg: state.place.lonDeg };
  return {
    dateTime: new Date(atMs).toISOString(),
    modeId: state.modeId ?? model.modes[0]!.id,
    banks: soc
      ? [soc.source === "resting_voltage" && soc.restingV !== undefined ? { bankId: bank.id, restingV: soc.restingV } : { bankId: bank.id, socPct: soc.socPct }]
      : [],
    loadsOn,
    switchPositions: state.positions,
    ...(place ? { location: place } : {}),
    weatherFactor: weatherFactor(state.weather),
  };
}

export interface PresentPower {
  drawW: number;
  sourceW: number;
  solarW: number;
  /** Positive: charging; negative: drawing from the bank. */
  netW: number;
  netA: number;
  bankV: number;
}

export interface NowResult {
  engineState: CurrentState;
  graph: CircuitGraph;
  projection: Projection;
  bank: BankProjection;
  bankModel: Bank;
  cutoffSocPct: number;
  present: PresentPower;
  socEstimate: SocFromVoltage | null;
}

/** Draw of the primary bank in the profile slot of a local hour. */
function drawAt(profile: Float64Array | undefined, hour: number): number {
  if (!profile) return 0;
  return profile[Math.min(PROFILE_SLOTS - 1, Math.floor((hour / 24) * PROFILE_SLOTS))]!;
}

/** Source power into a bank at an instant: the array output at the sun's position plus scheduled chargers. */
function sourcesAt(model: RigModel, engineState: CurrentState, bank: Bank, ms: number, hour: number): { solarW: number; otherW: number } {
  const mode = model.modes.find((m) => m.id === engineState.modeId) ?? model.modes[0]!;
  const modeSources = new Map(mode.sources.map((s) => [s.sourceId, s]));
  const place = engineState.location ?? model.home;
  const v = bankNominalV(bank);
  let solarW = 0;
  let otherW = 0;
  for (const src of model.sources) {
    if (src.bankId !== bank.id) continue;
    const m = modeSources.get(src.id);
    if (src.kind === "solar") {
      if (m?.enabled === false) continue;
      const sun = sunPosition(ms, place.latDeg, place.lonDeg, { elevationM: place.elevationM ?? 0 });
      const poa = planeOfArrayWm2(sun, dayOfYear(ms), src.tiltDeg, src.azimuthDeg, engineState.weatherFactor ?? 1).poaWm2;
      solarW += arrayOutputW(src, poa, engineState.ambientC ?? 20, v).outW;
    } else if (m?.enabled && (!m.windows?.length || m.windows.some((w) => inWindow(hour, w.startH, w.endH)))) {
      otherW += src.ratedA * v;
    }
  }
  return { solarW, otherW };
}

const profileCache = new WeakMap<object, Map<string, Float64Array>>();
/** The engine's draw profiles for a budget (memoised per budget object). */
function profilesFor(model: RigModel, graph: CircuitGraph, projection: Projection, s: CurrentState): Map<string, Float64Array> {
  let p = profileCache.get(projection.budget);
  if (!p) {
    p = drawProfiles(model, graph, projection.budget, planOf(s));
    profileCache.set(projection.budget, p);
  }
  return p;
}

function planOf(s: CurrentState): PlanInput {
  return { modeId: s.modeId, ...(s.loadsOn ? { loadsOn: s.loadsOn } : {}), ...(s.inverterIdsOn ? { inverterIdsOn: s.inverterIdsOn } : {}) };
}

/** Everything the Now screen shows, from the engine, for one model and state. */
export function computeNow({ model, state, atMs }: NowInput): NowResult {
  const graph = graphFor(model, state.positions);
  const engineState = toEngineState(model, state, atMs);
  const projection = runProjection(model, graph, engineState);
  const bank = projection.banks.find((b) => b.bankId === projection.primaryBankId)!;
  const bankModel = model.banks.find((b) => b.id === bank.bankId)!;
  const profile = profilesFor(model, graph, projection, engineState).get(bankModel.id);
  const hour = localHourFn(atMs, atMs + 60_000, model.timeZone)(atMs);
  const drawW = drawAt(profile, hour);
  const { solarW, otherW } = sourcesAt(model, engineState, bankModel, atMs, hour);
  const v = bankNominalV(bankModel);
  const netW = solarW + otherW - drawW;
  const soc = state.soc;
  return {
    engineState,
    graph,
    projection,
    bank,
    bankModel,
    cutoffSocPct: usableEnergy(bankModel, bank.startSocPct).cutoffSocPct,
    present: { drawW, sourceW: solarW + otherW, solarW, netW, netA: netW / v, bankV: v },
    socEstimate: soc?.source === "resting_voltage" && soc.restingV !== undefined ? socFromRestingVoltage(bankModel, soc.restingV) : null,
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

const solarCache = new Map<string, number[]>();
const nightCache = new Map<string, Array<[number, number]>>();

/** Night spans (sunset → sunrise, from the engine's sun events) over the projection, memoised per place and start. */
function nightsFor(place: { latDeg: number; lonDeg: number }, startMs: number, endMs: number, horizonH: number): Array<[number, number]> {
  const key = `${place.latDeg}|${place.lonDeg}|${startMs}|${endMs}`;
  const hit = nightCache.get(key);
  if (hit) return hit;
  const nights: Array<[number, number]> = [];
  let prevSet: number | null = null;
  for (let d = -1; d <= Math.ceil(horizonH / 24) + 1; d++) {
    const from = startMs + d * 86_400_000 - 43_200_000;
    const ev = sunEvents(from, from + 86_400_000, place.latDeg, place.lonDeg);
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

/** Chart series every 15 minutes over the projection (SoC from the projection; draw and solar from the engine's profiles and sun model). */
export function chartSeries(model: RigModel, now: NowResult, everyMin = 15): ChartSeries {
  const p = now.projection;
  const stride = Math.max(1, Math.round(everyMin / p.stepMin));
  const idx: number[] = [];
  for (let i = 0; i < p.timesMs.length; i += stride) idx.push(i);
  const t = idx.map((i) => p.timesMs[i]! / 1000);
  const hourOf = localHourFn(p.startMs, p.timesMs[p.timesMs.length - 1]!, model.timeZone);
  const profile = profilesFor(model, now.graph, p, now.engineState).get(now.bankModel.id);
  const drawW = idx.map((i) => drawAt(profile, hourOf(p.timesMs[i]!)));
  const place = now.engineState.location ?? model.home;
  const key = `${model.id}|${place.latDeg}|${place.lonDeg}|${now.engineState.weatherFactor}|${now.engineState.modeId}|${p.startMs}|${idx.length}`;
  let solarW = solarCache.get(key);
  if (!solarW) {
    solarW = idx.map((i) => {
      const ms = p.timesMs[i]!;
      const s = sourcesAt(model, now.engineState, now.bankModel, ms, hourOf(ms));
      return s.solarW + s.otherW;
    });
    if (solarCache.size > 20) solarCache.clear();
    solarCache.set(key, solarW);
  }
  const nights = nightsFor(place, p.startMs, p.timesMs[p.timesMs.length - 1]!, p.horizonH);
  return {
    t,
    socPct: idx.map((i) => now.bank.socPct[i]!),
    drawW,
    solarW,
    stopSocPct: now.bank.stopSocPct,
    cutoffSocPct: now.cutoffSocPct,
    nights,
    runwayEnd: now.bank.runwayH === null ? null : (p.startMs + now.bank.runwayH * 3_600_000) / 1000,
  };
}

export interface LoadCost {
  loadId: string;
  /** Runway with the load on minus runway with it off, hours (negative: it shortens the runway). Null when the runway passes the horizon either way. */
  deltaH: number | null;
  /** Runway with this load switched the other way (null: beyond the horizon). */
  otherRunwayH: number | null;
}

/**
 * What each load costs in runway: the projection re-run with that one load switched the other
 * way (coarser 15-minute steps; runs off the main path, one load at a time).
 */
export function loadCost(model: RigModel, state: RigState, atMs: number, loadId: string, base: NowResult): LoadCost {
  const on = new Set(base.engineState.loadsOn ?? []);
  const wasOn = on.has(loadId);
  if (wasOn) on.delete(loadId);
  else on.add(loadId);
  const graph = base.graph;
  const alt = runProjection(model, graph, toEngineState(model, state, atMs, { loadsOn: [...on] }), { stepMin: 15 });
  const altRunway = alt.banks.find((b) => b.bankId === alt.primaryBankId)?.runwayH ?? null;
  const baseCoarse = costBase(model, base);
  const withH = wasOn ? baseCoarse : altRunway;
  const withoutH = wasOn ? altRunway : baseCoarse;
  const deltaH = withH === null && withoutH === null ? null : (withH ?? alt.horizonH) - (withoutH ?? alt.horizonH);
  return { loadId, deltaH, otherRunwayH: altRunway };
}

const baseCache = new WeakMap<NowResult, number | null>();
/** The same coarse projection for the present switches, so costs compare like with like. */
function costBase(model: RigModel, base: NowResult): number | null {
  if (baseCache.has(base)) return baseCache.get(base)!;
  const p = runProjection(model, base.graph, base.engineState, { stepMin: 15 });
  const r = p.banks.find((b) => b.bankId === p.primaryBankId)?.runwayH ?? null;
  baseCache.set(base, r);
  return r;
}
