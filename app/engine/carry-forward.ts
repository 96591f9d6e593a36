/**
 * SoC carried forward: an SoC (or resting voltage) read hours ago is projected from when it was
 * read to the state's `dateTime`, through the states in between — the switch history
 * (`state.history`: positions, loads and mode from each change on) or, without one, the present
 * state for the whole gap — instead of being restarted at "now".
 */
import type { RigModel } from "./model";
import { buildCircuitGraph, type CircuitGraph } from "./circuit-graph";
import type { CurrentState } from "./state";

/** Readings this close to `dateTime` are used as they are. */
export const CARRY_MIN_GAP_MS = 5 * 60_000;

export interface CarriedSoc {
  bankId: string;
  fromSocPct: number;
  toSocPct: number;
  takenAt: string;
  segments: number;
}

type Runner = (model: RigModel, graph: CircuitGraph, state: CurrentState, opts: { horizonH: number; stepMin: number }) => { banks: { bankId: string; startSocPct: number; endSocPct: number }[] };

/** The state with every old reading replaced by its SoC carried to `dateTime`. */
export function carrySocForward(model: RigModel, graph: CircuitGraph, state: CurrentState, run: Runner): { state: CurrentState; carried: CarriedSoc[] } {
  const nowMs = Date.parse(state.dateTime);
  const carried: CarriedSoc[] = [];
  const banks = state.banks.map((entry) => {
    if (!entry.takenAt) return entry;
    const fromMs = Date.parse(entry.takenAt);
    if (!(nowMs - fromMs > CARRY_MIN_GAP_MS)) {
      const { takenAt: _t, ...rest } = entry;
      void _t;
      return rest;
    }
    // Segments: the history's changes between the reading and now, in time order.
    const changes = (state.history ?? []).map((h) => ({ ...h, ms: Date.parse(h.at) })).filter((h) => h.ms < nowMs).sort((a, b) => a.ms - b.ms);
    let current: Pick<CurrentState, "modeId" | "loadsOn" | "switchPositions"> = { modeId: state.modeId, ...(state.loadsOn ? { loadsOn: state.loadsOn } : {}), ...(state.switchPositions ? { switchPositions: state.switchPositions } : {}) };
    // The state in force at the reading: the last change before it (else the present one).
    const before = changes.filter((h) => h.ms <= fromMs).pop();
    if (before) current = { modeId: before.modeId ?? state.modeId, ...(before.loadsOn ? { loadsOn: before.loadsOn } : {}), ...(before.switchPositions ? { switchPositions: before.switchPositions } : {}) };
    const cuts = changes.filter((h) => h.ms > fromMs);
    let t = fromMs;
    const { takenAt: _t, ...start } = entry;
    void _t;
    let soc: number | undefined;
    let reading = start;
    let segments = 0;
    for (let i = 0; i <= cuts.length; i++) {
      const endMs = i < cuts.length ? cuts[i]!.ms : nowMs;
      if (endMs > t) {
        const g = current.switchPositions && JSON.stringify(current.switchPositions) !== JSON.stringify(graph.positions) ? buildCircuitGraph(model, current.switchPositions) : graph;
        const others = state.banks.filter((b) => b.bankId !== entry.bankId).map(({ takenAt: _x, ...b }) => { void _x; return b; });
        const p = run(model, g, { ...state, ...current, dateTime: new Date(t).toISOString(), banks: [reading, ...others], history: [] }, { horizonH: (endMs - t) / 3_600_000, stepMin: 5 });
        const b = p.banks.find((x) => x.bankId === entry.bankId)!;
        soc = b.endSocPct;
        reading = { bankId: entry.bankId, socPct: soc, ...(entry.temperatureC !== undefined ? { temperatureC: entry.temperatureC } : {}) };
        segments++;
        t = endMs;
      }
      if (i < cuts.length) {
        const h = cuts[i]!;
        current = { modeId: h.modeId ?? current.modeId, ...(h.loadsOn ? { loadsOn: h.loadsOn } : current.loadsOn ? { loadsOn: current.loadsOn } : {}), ...(h.switchPositions ? { switchPositions: h.switchPositions } : current.switchPositions ? { switchPositions: current.switchPositions } : {}) };
      }
    }
    if (soc === undefined) return start;
    carried.push({ bankId: entry.bankId, fromSocPct: entry.socPct ?? Number.NaN, toSocPct: soc, takenAt: entry.takenAt, segments });
    return { bankId: entry.bankId, socPct: soc, ...(entry.temperatureC !== undefined ? { temperatureC: entry.temperatureC } : {}) };
  });
  return { state: { ...state, banks }, carried };
}
