/**
 * The dawn plan on Now: when the bank falls short of the next charge (or reaches it with less
 * than the margin chosen here), the engine's smallest set of loads to switch off or shorten,
 * with one tap to switch the "off" ones. Every figure comes from app/engine/dawn-plan.ts.
 */
import { useMemo, useState } from "react";
import type { RigModel } from "~/engine/model";
import { planForDawn, type DawnPlan } from "~/engine/dawn-plan";
import { Button } from "~/components/ui/button";
import type { StateChange } from "~/schemas/rig-state";
import type { NowResult } from "./now-model";
import { formatDuration, formatPct } from "./format";

const MARGINS = [0, 5, 10] as const;

export function dawnPlanFor(model: RigModel, now: NowResult, marginSocPct: number): DawnPlan {
  return planForDawn(model, now.graph, now.engineState, { marginSocPct });
}

export function DawnPlanCard({ model, now, canWrite, onChange }: { model: RigModel; now: NowResult; canWrite: boolean; onChange: (c: StateChange) => void }) {
  const [margin, setMargin] = useState<number>(5);
  const plan = useMemo(() => dawnPlanFor(model, now, margin), [model, now, margin]);
  if (!plan.needed) return null;
  const words = plan.actions.map((a) => (a.kind === "off" ? `switch off ${a.name}` : a.kind === "halve" ? `halve the hours of ${a.name}` : `switch off ${a.name}`));
  return (
    <section aria-labelledby="dawn-plan-heading" className="space-y-3 rounded-2xl border border-dawn-500 bg-night-900 p-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="dawn-plan-heading" className="text-xl font-bold">Dawn plan</h2>
        <fieldset className="flex items-center gap-1">
          <legend className="sr-only">Margin at the next charge</legend>
          <span className="text-sm text-night-300">Margin</span>
          {MARGINS.map((m) => (
            <button
              key={m}
              type="button"
              aria-pressed={margin === m}
              onClick={() => setMargin(m)}
              className={`min-h-11 min-w-11 rounded-xl border px-2 tabular ${margin === m ? "border-dawn-400 bg-dawn-500 text-night-950" : "border-night-600"}`}
            >
              {m} %
            </button>
          ))}
        </fieldset>
      </div>
      {plan.found ? (
        <>
          <p data-testid="dawn-plan">
            To reach the next charge with {formatPct(margin)} above the floor: {words.join(", ")}. That gives up {formatDuration(plan.comfortLostH)} of use a day
            {plan.after?.marginSocPct !== null && plan.after?.marginSocPct !== undefined ? ` and leaves ${formatPct(plan.after.marginSocPct)} above the floor at the charge` : ""}.
          </p>
          {canWrite && plan.switchOff.length > 0 ? (
            <Button onClick={() => onChange({ kind: "switch", loads: plan.switchOff.map((loadId) => ({ loadId, on: false })) })}>
              Switch {plan.switchOff.length > 1 ? "them" : "it"} off
            </Button>
          ) : null}
          {plan.invertersOff.length ? <p className="text-sm text-night-300">Switch the inverter off at its panel: this screen does not control it.</p> : null}
          {plan.actions.some((a) => a.kind === "halve") ? <p className="text-sm text-night-300">Shorter hours are up to you: the switch cannot halve them.</p> : null}
        </>
      ) : (
        <p data-testid="dawn-plan">Switching off every load that is not essential is not enough to reach the next charge with {formatPct(margin)} to spare: charge sooner or lower the margin.</p>
      )}
      <p className="text-xs text-night-300">
        {plan.method === "exact" ? "Every combination was checked" : "Loads were tried best first"} ({plan.projectionsRun} projections); essential loads are kept. Ranked by runway gained per hour of use given up.
      </p>
    </section>
  );
}
