import type { RigModel } from "~/engine/model";

/** A rig's banks and loads, as stored in its as-built model. */
export function RigOverview({ model }: { model: RigModel }) {
  return (
    <div className="space-y-6">
      <section aria-labelledby="banks-heading" className="space-y-2">
        <h2 id="banks-heading" className="text-lg font-bold text-night-200">
          Battery {model.banks.length === 1 ? "bank" : "banks"}
        </h2>
        <ul className="space-y-2">
          {model.banks.map((bank) => {
            const capacityAh = bank.ratedAh * bank.parallelCount;
            const nominalV = bank.batteryNominalV * bank.seriesCount;
            return (
              <li key={bank.id} className="rounded-2xl border border-night-700 bg-night-900 p-4">
                <p className="text-lg font-bold">{bank.name}</p>
                <p className="tabular text-night-200">
                  {chemistryLabel[bank.chemistry]} · {capacityAh} Ah at {nominalV.toFixed(1)} V ·{" "}
                  {((capacityAh * nominalV) / 1000).toFixed(2)} kWh
                </p>
              </li>
            );
          })}
        </ul>
      </section>
      <section aria-labelledby="loads-heading" className="space-y-2">
        <h2 id="loads-heading" className="text-lg font-bold text-night-200">
          Loads <span className="tabular text-night-300">({model.loads.length})</span>
        </h2>
        <ul className="divide-y divide-night-800 rounded-2xl border border-night-700 bg-night-900">
          {model.loads.map((load) => (
            <li key={load.id} className="flex min-h-12 items-center justify-between gap-3 px-4 py-2">
              <span>
                {load.name}
                {load.essential ? <span className="ml-2 text-xs font-bold uppercase text-dawn-400">essential</span> : null}
              </span>
              <span className="tabular text-night-300">
                {load.powerW !== undefined ? `${load.powerW} W` : load.currentA !== undefined ? `${load.currentA} A` : ""}{" "}
                {load.current.toUpperCase()}
              </span>
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}

const chemistryLabel: Record<RigModel["banks"][number]["chemistry"], string> = {
  lifepo4: "LiFePO4",
  agm: "AGM",
  flooded: "Flooded lead-acid",
  gel: "Gel",
};
