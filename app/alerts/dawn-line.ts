/**
 * The engine's dawn plan as one sentence for an alert: which loads to switch off (or hours to
 * shorten) so the bank makes the next charge, with the load names from the model; essential
 * loads are never in it (the engine keeps them). Pure.
 *
 * `dawnPlanSentence` words a plan; `alertDawnPlanLine` runs the plan for a rig's model and
 * shared state at an instant (the same engine state the Now screen's dawn-plan card uses) and is
 * the default `EvaluateOptions.dawnPlanLine`. The evaluation calls it only for a rig whose
 * runway or falls-short episode opens, so the schedule's sweep pays for it only then.
 */
import { graphFor, toEngineState } from "~/components/now/now-model";
import { planForDawn, type DawnAction, type DawnPlan } from "~/engine/dawn-plan";
import type { RigModel } from "~/engine/model";
import type { RigState } from "~/schemas/rig-state";
import { ALERT_PROJECTION } from "./conditions";
import { hoursWords } from "./text";

/** "a", "a and b", "a, b and c". */
export function listWords(items: string[]): string {
  if (items.length <= 1) return items[0] ?? "";
  return `${items.slice(0, -1).join(", ")} and ${items[items.length - 1]}`;
}

function actionWords(a: DawnAction): string {
  if (a.kind === "halve") return `halve the hours of ${a.name}`;
  // An inverter's action is named by the engine with its AC loads ("Inverter 2000 W (and its AC loads)").
  return `switch off ${a.name}`;
}

/** One sentence for the alert, or null when no plan is needed. */
export function dawnPlanSentence(plan: DawnPlan): string | null {
  if (!plan.needed) return null;
  if (!plan.found) return "Switching off every load that is not essential is not enough to reach the next charge: charge sooner if you can.";
  const off = plan.actions.filter((a) => a.kind !== "halve").map(actionWords);
  const halve = plan.actions.filter((a) => a.kind === "halve").map(actionWords);
  const steps = listWords([...off, ...halve]);
  const spare = plan.after?.marginSocPct;
  const margin = spare !== null && spare !== undefined ? `, ${Math.round(spare)} % above the floor` : "";
  return `To make it to the next charge${margin}: ${steps} (essential loads stay on; ${hoursWords(plan.comfortLostH)} of use a day given up).`;
}

/** The default dawn-plan line for an alert: the engine's plan for this rig now. */
export function alertDawnPlanLine(model: RigModel, state: RigState, nowMs: number, opts: { marginSocPct?: number } = {}): string | null {
  const engineState = toEngineState(model, state, nowMs);
  if (!engineState.banks.length) return null;
  const plan = planForDawn(model, graphFor(model, state.positions), engineState, { marginSocPct: opts.marginSocPct ?? 0, stepMin: ALERT_PROJECTION.stepMin, horizonH: ALERT_PROJECTION.horizonH });
  return dawnPlanSentence(plan);
}
