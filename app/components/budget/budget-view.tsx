/**
 * A day's energy budget: by load and by bus, standby share, solar harvest for the place and
 * date, net balance and days of autonomy. Every figure comes from the engine.
 */
import { useMemo } from "react";
import type { RigModel } from "~/engine/model";
import { autonomy } from "~/engine/autonomy";
import { ExplainProvider, Explainable } from "~/components/now/explain";
import { computeNow, placeOf } from "~/components/now/now-model";
import { formatPct, formatWh } from "~/components/now/format";
import type { RigState } from "~/schemas/rig-state";
import { cn } from "~/lib/cn";

export function BudgetView({ model, state, atMs }: { model: RigModel; state: RigState; atMs: number }) {
  const view = useMemo(() => {
    const now = computeNow({ model, state, atMs });
    const budget = now.projection.budget;
    const auto = autonomy(model, now.graph, budget, now.bankModel.id, now.engineState);
    return { now, budget, auto };
  }, [model, state, atMs]);
  const { budget, auto, now } = view;
  const place = placeOf(model, state);
  const maxWh = Math.max(1, ...budget.loads.map((l) => l.whPerDay), ...budget.standby.map((s) => s.whPerDay));
  const net = auto.typicalSolarWhPerDay - auto.dailyDrawWh;
  const loads = [...budget.loads].filter((l) => l.whPerDay > 0).sort((a, b) => b.whPerDay - a.whPerDay);

  return (
    <ExplainProvider>
      <div className="space-y-6">
        <dl className="grid grid-cols-2 gap-3 md:grid-cols-4">
          <Stat label="Used per day" value={formatWh(budget.totalWhPerDay)} explain={{ title: "Used per day", value: formatWh(budget.totalWhPerDay), plain: `Loads at their hours in "${budget.modeName}" plus every standby draw over 24 hours.`, how: budget.how }} />
          <Stat label="Standby share" value={formatPct(budget.standbySharePct)} explain={{ title: "Standby share", value: formatPct(budget.standbySharePct), plain: `${formatWh(budget.standbyWhPerDay)} of the day's ${formatWh(budget.totalWhPerDay)} goes to standby draws: the bank's electronics, the inverter idling, devices that sip power while off.`, how: budget.how }} />
          <Stat label="Solar per day" value={formatWh(auto.typicalSolarWhPerDay)} explain={{ title: "Solar harvest", value: formatWh(auto.typicalSolarWhPerDay), plain: `Clear-sky harvest of the arrays at ${place.label} on this date, scaled by the weather choice.`, how: auto.how }} />
          <Stat
            label="Net balance"
            value={`${net >= 0 ? "+" : "−"}${formatWh(Math.abs(net))}`}
            tone={net >= 0 ? "good" : "bad"}
            explain={{ title: "Net balance", value: `${formatWh(Math.abs(net))} ${net >= 0 ? "surplus" : "short"}`, plain: `Solar per day (${formatWh(auto.typicalSolarWhPerDay)}) minus what the rig uses per day (${formatWh(auto.dailyDrawWh)}), before charge losses.`, how: auto.how }}
          />
          <Stat label="Days without charge" value={auto.daysNoCharge === null ? "—" : `${auto.daysNoCharge.toFixed(1)} days`} explain={{ title: "Days of autonomy", value: auto.daysNoCharge === null ? "—" : `${auto.daysNoCharge.toFixed(1)} days`, plain: `A full ${now.bankModel.name.toLowerCase()} holds ${formatWh(auto.usableWh)} down to its floor; at ${formatWh(auto.effectiveDailyDrawWh)} a day that lasts this long with no charging at all.`, how: auto.how }} />
          <Stat label="Days with this sun" value={auto.daysWithTypicalSun === null ? "indefinitely" : `${auto.daysWithTypicalSun.toFixed(1)} days`} explain={{ title: "Days with this sun", value: auto.daysWithTypicalSun === null ? "Solar covers the day" : `${auto.daysWithTypicalSun.toFixed(1)} days`, plain: auto.daysWithTypicalSun === null ? "The day's solar covers the day's use: the bank does not run down at this plan." : `With this sun each day, the bank runs down by the shortfall every day and reaches the floor after this many days.`, how: auto.how }} />
        </dl>

        <section aria-labelledby="by-load" className="space-y-2">
          <h2 id="by-load" className="text-xl font-bold">
            By load
          </h2>
          <table className="tabular w-full text-left">
            <caption className="sr-only">Energy per day by load, largest first</caption>
            <thead className="text-sm text-night-300">
              <tr>
                <th scope="col">Load</th>
                <th scope="col" className="text-right">
                  Hours
                </th>
                <th scope="col" className="text-right">
                  Wh/day
                </th>
                <th scope="col" className="w-1/3">
                  <span className="sr-only">Bar</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {loads.map((l) => (
                <tr key={l.loadId} className="border-t border-night-800">
                  <th scope="row" className="py-2 pr-2 font-normal">
                    {l.name}
                  </th>
                  <td className="text-right">{l.hoursPerDay}</td>
                  <td className="text-right">
                    <Explainable explanation={{ title: l.name, value: formatWh(l.whPerDay), plain: `${l.name} over a day in "${budget.modeName}".`, how: l.how }}>{Math.round(l.whPerDay)}</Explainable>
                  </td>
                  <td className="pl-2">
                    <Bar share={l.whPerDay / maxWh} />
                  </td>
                </tr>
              ))}
              {budget.standby
                .filter((s) => s.whPerDay > 0 && s.kind !== "load-standby")
                .map((s) => (
                  <tr key={`${s.kind}-${s.id}`} className="border-t border-night-800 text-night-200">
                    <th scope="row" className="py-2 pr-2 font-normal">
                      {s.name} <span className="text-xs uppercase text-night-300">standby</span>
                    </th>
                    <td className="text-right">24</td>
                    <td className="text-right">{Math.round(s.whPerDay)}</td>
                    <td className="pl-2">
                      <Bar share={s.whPerDay / maxWh} standby />
                    </td>
                  </tr>
                ))}
            </tbody>
          </table>
        </section>

        <section aria-labelledby="by-bus" className="space-y-2">
          <h2 id="by-bus" className="text-xl font-bold">
            By bus
          </h2>
          <ul className="divide-y divide-night-800 rounded-2xl border border-night-700 bg-night-900">
            {budget.buses
              .filter((b) => b.whPerDay > 0)
              .map((b) => (
                <li key={b.busId} className="flex min-h-12 items-center justify-between gap-3 px-4">
                  <span>{b.name}</span>
                  <span className="tabular font-bold">{formatWh(b.whPerDay)}</span>
                </li>
              ))}
          </ul>
          <p className="text-sm text-night-300">A bus counts every load whose feed passes through it, so downstream buses are included in the ones that feed them.</p>
        </section>
      </div>
    </ExplainProvider>
  );
}

function Bar({ share, standby }: { share: number; standby?: boolean }) {
  return (
    <div className="h-3 w-full rounded bg-night-800" aria-hidden="true">
      <div className={cn("h-3 rounded", standby ? "bg-ember-300" : "bg-dawn-500")} style={{ width: `${Math.max(1, Math.min(100, share * 100))}%` }} />
    </div>
  );
}

function Stat({ label, value, explain, tone }: { label: string; value: string; explain: Parameters<typeof Explainable>[0]["explanation"]; tone?: "good" | "bad" }) {
  return (
    <div className="rounded-2xl border border-night-700 bg-night-900 p-3" data-tone={tone}>
      <dt className="text-sm text-night-300">{label}</dt>
      <dd className={cn("text-xl font-bold", tone === "good" && "text-leaf-400", tone === "bad" && "text-ember-300")}>
        <Explainable explanation={explain}>{value}</Explainable>
      </dd>
    </div>
  );
}
