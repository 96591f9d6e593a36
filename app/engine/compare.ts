/**
 * Comparison over states: two rig states side by side — as built vs a draft, or one rig in two
 * sets of switch positions. For each: standby W and Wh/day, runway per mode, operations per
 * essential load (from "all off", with changeovers held where that state has them), loads
 * outside low-voltage protection and the audit findings.
 */
import type { RigModel } from "./model";
import { runAudit } from "./audit";
import { buildCircuitGraph, type CircuitGraph } from "./circuit-graph";
import { computeBudget } from "./draw";
import { operationsFor } from "./operations";
import { runProjection } from "./projection";
import { solveState } from "./solution";
import type { CurrentState } from "./state";

export interface ModeFigures {
  standbyW: number;
  standbyWhPerDay: number;
  totalWhPerDay: number;
  /** Null when the floor is not reached within the horizon. */
  runwayH: number | null;
}

export interface StateSide {
  model: RigModel;
  /** Positions recorded for this side (others resolve as the engine does). */
  switchPositions?: Record<string, string>;
  label?: string;
}

export interface Comparison {
  labels: { a: string; b: string };
  modes: { modeId: string; name: string; a: ModeFigures | null; b: ModeFigures | null }[];
  essentialLoads: { loadId: string; name: string; aOperations: number | null; bOperations: number | null }[];
  outsideLowVoltageProtection: { a: string[]; b: string[]; added: string[]; removed: string[] };
  findings: { a: string[]; b: string[]; added: string[]; removed: string[] };
  auditFailures: { a: number; b: number; added: string[]; removed: string[] };
}

export type CompareState = Pick<CurrentState, "dateTime" | "banks"> & Partial<Pick<CurrentState, "weatherFactor" | "location" | "ambientC">>;

function figures(model: RigModel, graph: CircuitGraph, modeId: string, state: CompareState, horizonH: number): ModeFigures {
  const b = computeBudget(model, graph, { modeId });
  const p = runProjection(model, graph, { ...state, modeId, ...(graph.positions ? { switchPositions: graph.positions } : {}) }, { horizonH, stepMin: 10 });
  const house = p.banks.find((x) => x.bankId === p.primaryBankId)!;
  return {
    standbyW: b.standby.reduce((s, x) => s + x.whPerDay, 0) / 24,
    standbyWhPerDay: b.standbyWhPerDay,
    totalWhPerDay: b.totalWhPerDay,
    runwayH: house.runwayH,
  };
}

function side(s: StateSide) {
  const graph = buildCircuitGraph(s.model, s.switchPositions ?? {});
  const plan = { modeId: s.model.modes[0]!.id };
  const sol = solveState(s.model, graph, plan);
  // Changeovers stay where this state has them: "already in position" is not an operation.
  const hold: Record<string, string> = {};
  for (const sw of s.model.switches) if (sw.kind === "changeover") hold[sw.id] = sol.at[sw.id]!;
  const audit = runAudit(s.model, graph, plan);
  return { graph, plan, sol, hold, audit };
}

const diff = (a: string[], b: string[]) => ({ added: b.filter((x) => !a.includes(x)), removed: a.filter((x) => !b.includes(x)) });

/** Compare two states. Both models must be valid. */
export function compareStates(a: StateSide, b: StateSide, state: CompareState, opts: { horizonH?: number } = {}): Comparison {
  const horizonH = opts.horizonH ?? 72;
  const sa = side(a), sb = side(b);
  const modeIds = [...new Set([...a.model.modes.map((m) => m.id), ...b.model.modes.map((m) => m.id)])];
  const modes = modeIds.map((id) => {
    const ma = a.model.modes.find((m) => m.id === id);
    const mb = b.model.modes.find((m) => m.id === id);
    return {
      modeId: id,
      name: (mb ?? ma)!.name,
      a: ma ? figures(a.model, sa.graph, id, state, horizonH) : null,
      b: mb ? figures(b.model, sb.graph, id, state, horizonH) : null,
    };
  });
  const essentialIds = [...new Set([...a.model.loads, ...b.model.loads].filter((l) => l.essential).map((l) => l.id))];
  const ops = (s: StateSide, x: ReturnType<typeof side>, id: string) =>
    s.model.loads.some((l) => l.id === id) ? operationsFor(s.model, x.graph, id, "all-off", { hold: x.hold })?.operationCount ?? null : null;
  const essentialLoads = essentialIds.map((id) => ({
    loadId: id,
    name: (b.model.loads.find((l) => l.id === id) ?? a.model.loads.find((l) => l.id === id))!.name,
    aOperations: ops(a, sa, id),
    bOperations: ops(b, sb, id),
  }));
  const outA = sa.audit.outsideLowVoltageProtection.map((x) => x.name);
  const outB = sb.audit.outsideLowVoltageProtection.map((x) => x.name);
  const fA = sa.audit.findings.map((f) => f.title);
  const fB = sb.audit.findings.map((f) => f.title);
  const failA = sa.audit.failures.map((f) => `${f.circuitId}: ${f.message}`);
  const failB = sb.audit.failures.map((f) => `${f.circuitId}: ${f.message}`);
  return {
    labels: { a: a.label ?? "as built", b: b.label ?? "draft" },
    modes,
    essentialLoads,
    outsideLowVoltageProtection: { a: outA, b: outB, ...diff(outA, outB) },
    findings: { a: fA, b: fB, ...diff(fA, fB) },
    auditFailures: { a: failA.length, b: failB.length, ...diff(failA, failB) },
  };
}

/** As built vs a draft, in the same (recorded) positions. */
export function compareModels(asBuilt: RigModel, draft: RigModel, state: CompareState, opts: { horizonH?: number; switchPositions?: Record<string, string> } = {}): Comparison {
  const pos = opts.switchPositions ? { switchPositions: opts.switchPositions } : {};
  return compareStates({ model: asBuilt, label: "as built", ...pos }, { model: draft, label: "draft", ...pos }, state, opts);
}
