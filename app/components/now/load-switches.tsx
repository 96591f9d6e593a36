import { useState } from "react";
import type { RigModel } from "~/engine/model";
import type { LoadBudget, StandbyItem } from "~/engine/draw";
import type { SwitchStep } from "~/engine/circuit-graph";
import { Toggle } from "~/components/ui/toggle";
import { Button } from "~/components/ui/button";
import { cn } from "~/lib/cn";
import { blockedSteps, type LoadCost, type NowResult } from "./now-model";
import { Explainable } from "./explain";
import { autonomyDaysCost, formatDays, formatDelta, formatDuration, formatW, formatWh } from "./format";
import { usableEnergy } from "~/engine/battery";
import { effectiveLoadsOn, type RigState, type StateChange } from "~/schemas/rig-state";

interface Group {
  busId: string;
  name: string;
  loads: RigModel["loads"];
}

/** Loads grouped by the bus they hang off (the last bus on their feed path), essential first. */
export function groupLoadsByBus(model: RigModel, now: NowResult): Group[] {
  const groups = new Map<string, Group>();
  for (const bus of model.buses) groups.set(bus.id, { busId: bus.id, name: bus.name, loads: [] });
  const other: Group = { busId: "", name: "Not on a bus", loads: [] };
  for (const load of model.loads) {
    const via = now.graph.loads[load.id]?.primary?.via ?? [];
    const bus = [...via].reverse().find((v) => v.kind === "bus");
    (bus ? groups.get(bus.id) ?? other : other).loads.push(load);
  }
  const list = [...groups.values(), other].filter((g) => g.loads.length);
  for (const g of list) g.loads.sort((a, b) => Number(b.essential) - Number(a.essential));
  // Groups holding essential loads come first.
  return list.sort((a, b) => Number(b.loads.some((l) => l.essential)) - Number(a.loads.some((l) => l.essential)));
}

const stepText = (s: SwitchStep) => `${s.name} → ${s.position}${s.location ? ` (${s.location})` : ""}`;

export function LoadSwitches({
  model,
  state,
  now,
  costs,
  canWrite,
  onChange,
}: {
  model: RigModel;
  state: RigState;
  now: NowResult;
  costs: Map<string, LoadCost>;
  canWrite: boolean;
  onChange: (c: StateChange) => void;
}) {
  const [offer, setOffer] = useState<{ loadId: string; steps: SwitchStep[] } | null>(null);
  // Running = switched on and powered in the engine's solution for the present positions.
  const onSet = new Set(now.projection.budget.loads.filter((l) => l.on && l.powered).map((l) => l.loadId));
  const wantedSet = effectiveLoadsOn(model, now.engineState.modeId, state.switches);
  const budgetById = new Map<string, LoadBudget>(now.projection.budget.loads.map((l) => [l.loadId, l]));
  const groups = groupLoadsByBus(model, now);
  const usableWh = usableEnergy(now.bankModel, 100).usableWh;

  const toggle = (loadId: string, next: boolean) => {
    const lg = now.graph.loads[loadId];
    const blocked = blockedSteps(lg, state.positions);
    if (next && blocked.length) {
      setOffer({ loadId, steps: lg?.switchPath ?? [] });
      return;
    }
    setOffer(null);
    onChange({ kind: "switch", loads: [{ loadId, on: next }] });
  };

  return (
    <section aria-labelledby="loads-heading" className="space-y-4">
      <h2 id="loads-heading" className="text-xl font-bold">
        Loads
      </h2>
      {groups.map((g) => (
        <div key={g.busId || "none"} className="space-y-2">
          <h3 className="text-sm font-bold uppercase tracking-wider text-night-300">{g.name}</h3>
          <ul className="divide-y divide-night-800 rounded-2xl border border-night-700 bg-night-900">
            {g.loads.map((load) => {
              const b = budgetById.get(load.id);
              const lg = now.graph.loads[load.id];
              const isWanted = wantedSet.has(load.id);
              const blocked = blockedSteps(lg, state.positions);
              const running = onSet.has(load.id);
              const cost = costs.get(load.id);
              const descId = `load-${load.id}-desc`;
              return (
                <li key={load.id} className="px-4 py-3" data-load={load.id}>
                  <div className="flex items-center gap-3">
                    <div className="min-w-0 flex-1">
                      <p className="font-bold">
                        {load.name}
                        {load.essential ? <span className="ml-2 rounded bg-night-800 px-1.5 py-0.5 text-xs uppercase text-dawn-300">essential</span> : null}
                      </p>
                      <p id={descId} className="tabular text-sm text-night-200">
                        {b ? (
                          <Explainable
                            explanation={{
                              title: `${load.name} power`,
                              value: formatW(b.bankW),
                              plain:
                                load.current === "ac"
                                  ? `${load.name} runs at ${formatW(b.runW)} on the AC side; through the inverter the bank supplies ${formatW(b.bankW)}. Over a day in this plan it uses ${formatWh(b.whPerDay)}.`
                                  : `${load.name} draws ${formatW(b.bankW)} from the bank while it runs${b.dutyCyclePct < 100 ? `, ${b.dutyCyclePct} % of the time (its duty cycle)` : ""}. Over a day in this plan it uses ${formatWh(b.whPerDay)}.`,
                              how: b.how,
                              source: "Rig model (as built): the load's rating; inverter efficiency for AC loads.",
                            }}
                          >
                            {formatW(b.bankW)}
                          </Explainable>
                        ) : null}
                        {" · "}
                        <CostLabel cost={cost} on={isWanted} name={load.name} horizonH={now.projection.horizonH} budget={b} totalWhPerDay={now.projection.budget.totalWhPerDay} usableWh={usableWh} />
                      </p>
                      {isWanted && !running && blocked.length ? (
                        <p className="text-sm text-ember-300">Not running: {blocked.map((s) => `${s.name} is ${state.positions[s.deviceId]}`).join(", ")}</p>
                      ) : null}
                      {lg?.outsideLowVoltageProtection ? (
                        <p className="text-sm text-ember-300">Outside the bank&apos;s low-voltage protection: it can drain the bank past the cutoff.</p>
                      ) : null}
                    </div>
                    {canWrite ? (
                      <Toggle checked={isWanted} onChange={(v) => toggle(load.id, v)} label={load.name} describedBy={descId} />
                    ) : (
                      <span className={cn("rounded-full px-3 py-1 text-sm font-bold", isWanted ? "bg-dawn-600 text-night-950" : "bg-night-800 text-night-200")}>
                        {isWanted ? "On" : "Off"}
                      </span>
                    )}
                  </div>
                  {offer?.loadId === load.id ? (
                    <div role="alert" className="mt-3 space-y-2 rounded-xl border border-dawn-600 bg-night-800 p-3">
                      <p className="font-bold">To run {load.name}, this switch path must be set:</p>
                      <ol className="list-decimal space-y-1 pl-6">
                        {offer.steps.map((s) => (
                          <li key={`${s.deviceId}-${s.circuitId}`} className={blockedSteps(lg, state.positions).includes(s) ? "text-ember-300" : undefined}>
                            {stepText(s)}
                          </li>
                        ))}
                      </ol>
                      <div className="flex flex-wrap gap-2">
                        <Button
                          variant="primary"
                          onClick={() => {
                            setOffer(null);
                            onChange({
                              kind: "switch",
                              loads: [{ loadId: load.id, on: true }],
                              positions: offer.steps.filter((s) => s.kind !== "breaker").map((s) => ({ switchId: s.deviceId, position: s.position })),
                            });
                          }}
                        >
                          Switch them all
                        </Button>
                        <Button variant="outline" onClick={() => setOffer(null)}>
                          Cancel
                        </Button>
                      </div>
                    </div>
                  ) : null}
                </li>
              );
            })}
          </ul>
        </div>
      ))}
      <p className="sr-only">{onSet.size} loads running.</p>
    </section>
  );
}

function CostLabel({ cost, on, name, horizonH, budget, totalWhPerDay, usableWh }: { cost: LoadCost | undefined; on: boolean; name: string; horizonH: number; budget: LoadBudget | undefined; totalWhPerDay: number; usableWh: number }) {
  if (!cost) return <span className="text-night-300">runway cost …</span>;
  if (cost.deltaH === null) {
    // The runway passes the horizon either way: compare loads by their energy a day and what it takes off the days of autonomy.
    const wh = budget ? (on ? budget.whPerDay : budget.bankW * (budget.dutyCyclePct / 100) * budget.hoursPerDay) : 0;
    const days = autonomyDaysCost(usableWh, totalWhPerDay, wh, on);
    const text = `${formatWh(wh)}/day${on ? "" : " if on"} · ${days === null ? "no end to autonomy without it" : `${formatDays(days)} of autonomy`}`;
    return (
      <Explainable
        explanation={{
          title: `${name} in a day`,
          value: text,
          plain: `The runway lasts beyond the ${horizonH} hours the projection looks ahead whether ${name} is on or off, so its cost is shown per day: ${formatWh(wh)} a day${on ? "" : " if it ran its hours in this mode"}. With no charging, the full bank's ${formatWh(usableWh)} of usable energy lasts ${days === null ? "without end once it is off" : `${formatDays(days)} ${on ? "longer without it" : "less with it"}`}.`,
          inputs: [
            [`${name}, energy a day`, formatWh(wh)],
            ["Whole rig, energy a day", formatWh(totalWhPerDay)],
            ["Usable energy of a full bank", formatWh(usableWh)],
          ],
          source: "Days of autonomy = usable energy ÷ energy a day, with and without the load (trade practice; no charging counted).",
        }}
        className="text-dawn-300"
      >
        <span data-testid="load-day-cost">{text}</span>
      </Explainable>
    );
  }
  const text = on ? formatDelta(cost.deltaH) : `${formatDelta(cost.deltaH)} if on`;
  return (
    <Explainable
      explanation={{
        title: `${name} in runway`,
        value: text,
        plain: on
          ? `With ${name} off, the runway would be ${formatDuration(cost.otherRunwayH, horizonH)}. Keeping it on costs ${formatDuration(Math.abs(cost.deltaH))} of runway.`
          : `Switching ${name} on would make the runway ${formatDuration(cost.otherRunwayH, horizonH)}, ${formatDuration(Math.abs(cost.deltaH))} shorter.`,
        inputs: [
          ["Runway the other way", formatDuration(cost.otherRunwayH, horizonH)],
          ["Difference", formatDuration(Math.abs(cost.deltaH))],
        ],
        source: "The engine's projection run twice, with and without this load (15-minute steps).",
      }}
      className={cn(cost.deltaH !== 0 && "text-dawn-300")}
    >
      {text}
    </Explainable>
  );
}

/** Standby draws that stay on whatever is switched here. */
export function StandbyList({ items }: { items: StandbyItem[] }) {
  const shown = items.filter((i) => i.w > 0);
  const total = shown.reduce((s, i) => s + i.w, 0);
  return (
    <section aria-labelledby="standby-heading" className="space-y-2">
      <h2 id="standby-heading" className="text-xl font-bold">
        Always drawing <span className="tabular text-base text-night-300">({formatW(total)})</span>
      </h2>
      <p className="text-sm text-night-200">Standby draws you cannot switch off from here: the bank&apos;s own electronics, an inverter left on, devices that sip power while off.</p>
      <ul className="divide-y divide-night-800 rounded-2xl border border-night-700 bg-night-900">
        {shown.map((i) => (
          <li key={`${i.kind}-${i.id}`} className="flex min-h-12 items-center justify-between gap-3 px-4 py-2">
            <span>{i.name}</span>
            <Explainable
              explanation={{
                title: i.name,
                value: formatW(i.w),
                plain: `${i.name} draws ${formatW(i.w)} while it is live, ${formatWh(i.whPerDay)} over a day.`,
                inputs: [
                  ["Standby power", formatW(i.w)],
                  ["Per day", formatWh(i.whPerDay)],
                ],
                source: "Rig model (as built): standby figures of the bank, inverter and loads.",
              }}
            >
              {formatW(i.w)}
            </Explainable>
          </li>
        ))}
      </ul>
    </section>
  );
}
