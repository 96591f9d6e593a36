/**
 * A plan: the mode and which loads and inverters are on. Shared by the solution, the budget
 * and the projection.
 */
import type { Load, Mode, RigModel } from "./model";

export interface PlanInput {
  modeId: string;
  /** Loads switched on now; absent = the mode's loads. Loads on but not in the mode run all day. */
  loadsOn?: string[];
  /** Inverters on; absent = the mode's, plus any an AC load switched on needs. */
  inverterIdsOn?: string[];
}

export interface PlannedLoad {
  load: Load;
  on: boolean;
  hoursPerDay: number;
  windows: { startH: number; endH: number }[] | undefined;
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
