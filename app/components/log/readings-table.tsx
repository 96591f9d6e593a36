import { Link } from "react-router";
import { cn } from "~/lib/cn";
import type { LocalReading } from "~/offline/db.client";
import { formatDateTime, type TimeSettings } from "~/lib/datetime";
import type { UnitPrefs } from "~/lib/units";
import { fmt, fmtCurrent, fmtTemperature, sourceLabel } from "~/logbook/format";

export type TableFilter = { from: string; to: string; source: "" | LocalReading["source"]; only: "" | "waiting" | "refused" };

const syncWords: Record<LocalReading["sync"], string> = { pending: "Saved on phone", synced: "Synced", refused: "Not accepted" };
// The sync state carries its meaning by a mark and words as well as colour (night mode is red only).
const syncMark: Record<LocalReading["sync"], string> = { pending: "◷", synced: "✓", refused: "✕" };

type Props = {
  rows: LocalReading[];
  rigId: string;
  canEdit: (r: LocalReading) => boolean;
  onDelete: (r: LocalReading) => void;
  time: TimeSettings;
  units: UnitPrefs;
};

function SyncState({ r }: { r: LocalReading }) {
  return (
    <>
      <span
        className={cn("inline-flex items-center gap-1 font-bold", r.sync === "synced" ? "text-leaf-400" : r.sync === "pending" ? "text-dawn-300" : "text-ember-300 underline decoration-2")}
        title={r.refusal}
      >
        <span aria-hidden="true">{syncMark[r.sync]}</span>
        {syncWords[r.sync]}
      </span>
      {r.refusal ? <span className="block text-xs text-ember-300">{r.refusal}</span> : null}
    </>
  );
}

function Actions({ r, rigId, onDelete, when }: { r: LocalReading; rigId: string; onDelete: (r: LocalReading) => void; when: string }) {
  return (
    <span className="flex gap-1">
      <Link to={`/rigs/${rigId}/log/${r.id}`} className="inline-flex min-h-11 min-w-11 items-center justify-center rounded-lg px-2 font-bold text-dawn-300 underline">
        Edit<span className="sr-only"> reading of {when}</span>
      </Link>
      <button type="button" onClick={() => onDelete(r)} className="inline-flex min-h-11 min-w-11 items-center justify-center rounded-lg px-2 font-bold text-ember-300 underline">
        Delete<span className="sr-only"> reading of {when}</span>
      </button>
    </span>
  );
}

/**
 * The logbook's readings: a card per reading on a phone (under 640 px every value and the
 * actions stay on screen), a table on wider screens.
 */
export function ReadingsTable({ rows, rigId, canEdit, onDelete, time, units }: Props) {
  return (
    <>
      <ol aria-label="Readings, newest first" className="space-y-2 sm:hidden" data-readings="cards">
        {rows.map((r) => {
          const when = formatDateTime(r.takenAt, time);
          return (
            <li key={r.id} data-reading-id={r.id} className="rounded-2xl border border-night-700 bg-night-900 p-3">
              <div className="flex flex-wrap items-baseline justify-between gap-x-3">
                <span className="font-bold">{when}</span>
                <span className="text-xs text-night-300">{sourceLabel[r.source]}</span>
              </div>
              <dl className="mt-2 grid grid-cols-3 gap-2 tabular">
                <div>
                  <dt className="text-xs text-night-300">Voltage</dt>
                  <dd className="whitespace-nowrap font-bold">{fmt(r.bankVoltageV, 2, "V")}</dd>
                </div>
                <div>
                  <dt className="text-xs text-night-300">Current</dt>
                  <dd className="whitespace-nowrap font-bold">{fmtCurrent(r.currentA)}</dd>
                </div>
                <div>
                  <dt className="text-xs text-night-300">SoC</dt>
                  <dd className="whitespace-nowrap font-bold">{fmt(r.socPct, 0, "%")}</dd>
                </div>
                {r.temperatureC !== null ? (
                  <div>
                    <dt className="text-xs text-night-300">Temp.</dt>
                    <dd className="whitespace-nowrap">{fmtTemperature(r.temperatureC, units)}</dd>
                  </div>
                ) : null}
                {r.solarWhToday !== null ? (
                  <div>
                    <dt className="text-xs text-night-300">Solar</dt>
                    <dd className="whitespace-nowrap">{fmt(r.solarWhToday, 0, "Wh")}</dd>
                  </div>
                ) : null}
              </dl>
              {r.note ? <p className="mt-2 break-words text-sm text-night-200">{r.note}</p> : null}
              <div className="mt-2 flex flex-wrap items-center justify-between gap-2 text-sm">
                <span>
                  <SyncState r={r} />
                </span>
                {canEdit(r) ? <Actions r={r} rigId={rigId} onDelete={onDelete} when={when} /> : null}
              </div>
            </li>
          );
        })}
      </ol>
      {/* "relative": the screen-reader-only labels in the cells are positioned against this box. */}
      <div className="relative hidden overflow-x-auto rounded-2xl border border-night-700 sm:block" data-readings="table">
        <table className="w-full text-left tabular">
          <caption className="sr-only">Readings, newest first</caption>
          <thead className="bg-night-900 text-sm text-night-300">
            <tr>
              <th scope="col" className="px-3 py-2">Taken</th>
              <th scope="col" className="px-3 py-2 text-right">Voltage</th>
              <th scope="col" className="px-3 py-2 text-right">Current</th>
              <th scope="col" className="px-3 py-2 text-right">SoC</th>
              <th scope="col" className="px-3 py-2 text-right">Temp.</th>
              <th scope="col" className="px-3 py-2 text-right">Solar</th>
              <th scope="col" className="px-3 py-2">Note</th>
              <th scope="col" className="px-3 py-2">State</th>
              <th scope="col" className="px-3 py-2"><span className="sr-only">Actions</span></th>
            </tr>
          </thead>
          <tbody className="divide-y divide-night-800">
            {rows.map((r) => {
              const when = formatDateTime(r.takenAt, time);
              return (
                <tr key={r.id} data-reading-id={r.id} className="align-top">
                  <td className="px-3 py-2">
                    {when}
                    <span className="block text-xs text-night-300">{sourceLabel[r.source]}</span>
                  </td>
                  <td className="whitespace-nowrap px-3 py-2 text-right">{fmt(r.bankVoltageV, 2, "V")}</td>
                  <td className="whitespace-nowrap px-3 py-2 text-right">{fmtCurrent(r.currentA)}</td>
                  <td className="whitespace-nowrap px-3 py-2 text-right">{fmt(r.socPct, 0, "%")}</td>
                  <td className="whitespace-nowrap px-3 py-2 text-right">{fmtTemperature(r.temperatureC, units)}</td>
                  <td className="whitespace-nowrap px-3 py-2 text-right">{fmt(r.solarWhToday, 0, "Wh")}</td>
                  <td className="max-w-48 break-words px-3 py-2 text-sm text-night-200">{r.note}</td>
                  <td className="px-3 py-2 text-sm">
                    <SyncState r={r} />
                  </td>
                  <td className="whitespace-nowrap px-3 py-1">{canEdit(r) ? <Actions r={r} rigId={rigId} onDelete={onDelete} when={when} /> : null}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </>
  );
}
