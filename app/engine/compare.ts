/**
 * Draft vs as built: differences in standby, daily energy, runway per mode, switch count per
 * essential load, loads outside low-voltage protection and audit failures.
 */
import type { RigModel } from "./model";
import { runAudit } from "./audit";
import { buildCircuitGraph } from "./circuit-graph";
import { computeBudget } from "./draw";
import { runProjection } from "./projection";
import type { CurrentState } from "./state";

export interface ModeFigures {
  standbyW: number;
  standbyWhPerDay: number;
  totalWhPerDay: number;
  /** Null when the floor is not reached within the horizon. */
  runwayH: number | null;
}

export interface Comparison {
  modes: { modeId: string; name: string; asBuilt: ModeFigures | null; draft: ModeFigures | null }[];
  essentialLoads: { loadId: string; name: string; asBuiltSwitchCount: number | null; draftSwitchCount: number | null }[];
  outsideLowVoltageProtection: { added: string[]; removed: string[] };
  auditFailures: { asBuilt: number; draft: number; added: string[]; removed: string[] };
}

export type CompareState = Pick<CurrentState, "dateTime" | "banks"> & Partial<Pick<CurrentState, "weatherFactor" | "location" | "ambientC">>;

function figures(model: RigModel, graph: ReturnType<typeof buildCircuitGraph>, modeId: string, state: CompareState, horizonH: number): ModeFigures {
  const b = computeBudget(model, graph, { modeId });
  const p = runProjection(model, graph, { ...state, modeId }, { horizonH, stepMin: 10 });
  const house = p.banks.find((x) => x.bankId === p.primaryBankId)!;
  return {
    standbyW: b.standby.reduce((s, x) => s + x.whPerDay, 0) / 24,
    standbyWhPerDay: b.standbyWhPerDay,
    totalWhPerDay: b.totalWhPerDay,
    runwayH: house.runwayH,
  };
}

/** Both models must be valid. */
export function compareModels(asBuilt: RigModel, draft: RigModel, state: CompareState, opts: { horizonH?: number } = {}): Comparison {
  const horizonH = opts.horizonH ?? 72;
  const ga = buildCircuitGraph(asBuilt);
  const gd = buildCircuitGraph(draft);
  const modeIds = [...new Set([...asBuilt.modes.map((m) => m.id), ...draft.modes.map((m) => m.id)])];
  const modes = modeIds.map((id) => {
    const ma = asBuilt.modes.find((m) => m.id === id);
    const md = draft.modes.find((m) => m.id === id);
    return {
      modeId: id,
      name: (md ?? ma)!.name,
      asBuilt: ma ? figures(asBuilt, ga, id, state, horizonH) : null,
      draft: md ? figures(draft, gd, id, state, horizonH) : null,
    };
  });
  const essentialIds = [...new Set([...asBuilt.loads, ...draft.loads].filter((l) => l.essential).map((l) => l.id))];
  const essentialLoads = essentialIds.map((id) => ({
    loadId: id,
    name: (draft.loads.find((l) => l.id === id) ?? asBuilt.loads.find((l) => l.id === id))!.name,
    asBuiltSwitchCount: ga.loads[id]?.switchCount ?? null,
    draftSwitchCount: gd.loads[id]?.switchCount ?? null,
  }));
  const outside = (m: RigModel, g: typeof ga) => new Set(m.loads.filter((l) => g.loads[l.id]?.outsideLowVoltageProtection).map((l) => l.name));
  const oa = outside(asBuilt, ga), od = outside(draft, gd);
  const fa = new Set(runAudit(asBuilt, ga).failures.map((f) => `${f.circuitId}: ${f.message}`));
  const fd = new Set(runAudit(draft, gd).failures.map((f) => `${f.circuitId}: ${f.message}`));
  return {
    modes,
    essentialLoads,
    outsideLowVoltageProtection: { added: [...od].filter((x) => !oa.has(x)), removed: [...oa].filter((x) => !od.has(x)) },
    auditFailures: { asBuilt: fa.size, draft: fd.size, added: [...fd].filter((x) => !fa.has(x)), removed: [...fa].filter((x) => !fd.has(x)) },
  };
}
