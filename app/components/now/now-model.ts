/**
 * The Now screen's bridge to the engine: turns the shared rig state into the engine's
 * CurrentState and calls the engine's Now module (app/engine/now.ts). It computes nothing of
 * its own: every number shown comes from app/engine.
 */
import { buildCircuitGraph, type CircuitGraph, type LoadGraph, type SwitchStep } from "~/engine/circuit-graph";
import type { Bank, RigModel } from "~/engine/model";
import { chartSeries as engineChartSeries, loadRunwayCost, nowFigures, type ChartSeries, type LoadCost, type NowFigures } from "~/engine/now";
import { primaryBank } from "~/engine/primary-bank";
import type { CurrentState } from "~/engine/state";
import { effectiveLoadsOn, socEntryFor, weatherFactor, type RigState } from "~/schemas/rig-state";

export type { ChartSeries, LoadCost, PresentPower } from "~/engine/now";
export { primaryBank };

export interface NowInput {
  model: RigModel;
  state: RigState;
  /** The instant to plan from. */
  atMs: number;
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

/** The rig state as the engine's input: every bank's SoC entry, loads on, positions, place, weather. */
export function toEngineState(model: RigModel, state: RigState, atMs: number, extra?: { loadsOn?: string[] }): CurrentState {
  const on = effectiveLoadsOn(model, state.modeId, state.switches);
  const loadsOn = extra?.loadsOn ?? [...on];
  const place = state.place.kind === "home" ? undefined : { latDeg: state.place.latDeg, lonDeg: state.place.lonDeg };
  const banks: CurrentState["banks"] = [];
  for (const b of model.banks) {
    const soc = socEntryFor(state, b.id, primaryBank(model).id);
    if (!soc) continue;
    banks.push({
      bankId: b.id,
      ...(soc.source === "resting_voltage" && soc.restingV !== undefined ? { restingV: soc.restingV } : { socPct: soc.socPct }),
      takenAt: soc.takenAt,
    });
  }
  return {
    dateTime: new Date(atMs).toISOString(),
    modeId: state.modeId ?? model.modes[0]!.id,
    banks,
    loadsOn,
    switchPositions: state.positions,
    // The switch history since the SoC entry (server-loaded; the phone keeps the last one), so
    // an old SoC is carried through the switches of the hours in between.
    ...(state.history?.length ? { history: state.history } : {}),
    ...(place ? { location: place } : {}),
    weatherFactor: weatherFactor(state.weather),
  };
}

export interface NowResult extends NowFigures {
  engineState: CurrentState;
  graph: CircuitGraph;
}

/** Everything the Now screen shows, from the engine, for one model and state. */
export function computeNow({ model, state, atMs }: NowInput): NowResult {
  const graph = graphFor(model, state.positions);
  const engineState = toEngineState(model, state, atMs);
  return { ...nowFigures(model, graph, engineState, atMs), engineState, graph };
}

/** Chart series every 15 minutes over the projection (from the engine's Now module). */
export function chartSeries(model: RigModel, now: NowResult, everyMin = 15): ChartSeries {
  return engineChartSeries(model, now.graph, now.engineState, now, everyMin);
}

/** What each load costs in runway (the engine's loadRunwayCost for the present state). */
export function loadCost(model: RigModel, state: RigState, atMs: number, loadId: string, base: NowResult): LoadCost {
  void state;
  void atMs;
  return loadRunwayCost(model, base.graph, base.engineState, loadId, base.projection);
}

export type { Bank };
