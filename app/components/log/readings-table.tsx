import { Link } from "react-router";
import { cn } from "~/lib/cn";
import type { LocalReading } from "~/offline/db.client";
import { fmt, fmtCurrent, fmtTime, sourceLabel } from "~/logbook/format";

export type TableFilter = { from: string; to: string; source: "" | LocalReading["source"]; only: "" | "waiting" | "refused" };

const syncWords: Record<LocalReading["sync"], string> = { pending: "Saved on phone", synced: "Synced", refused: "Not accepted" };

export function ReadingsTable({
  rows,
  rigId,
  canEdit,
  onDelete,
}: {
  rows: LocalReading[];
  rigId: string;
  canEdit: (r: LocalReading) => boolean;
  onDelete: (r: LocalReading) => void;
}) {
  // "relative": the screen-reader-only labels in the cells are positioned against this scrolling
  // box, not the page, so they cannot widen a phone's layout (which zoomed the page out).
  return (
    <div className="relative overflow-x-auto rounded-2xl border border-night-700">
      <table className="w-full min-w-[40rem] text-left tabular">
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
          {rows.map((r) => (
            <tr key={r.id} data-reading-id={r.id} className="align-top">
              <td className="whitespace-nowrap px-3 py-2">
                {fmtTime(r.takenAt)}
                <span className="block text-xs text-night-300">{sourceLabel[r.source]}</span>
              </td>
              <td className="px-3 py-2 text-right">{fmt(r.bankVoltageV, 2, "V")}</td>
              <td className="px-3 py-2 text-right">{fmtCurrent(r.currentA)}</td>
              <td className="px-3 py-2 text-right">{fmt(r.socPct, 0, "%")}</td>
              <td className="px-3 py-2 text-right">{fmt(r.temperatureC, 0, "°C")}</td>
              <td className="px-3 py-2 text-right">{fmt(r.solarWhToday, 0, "Wh")}</td>
              <td className="max-w-48 px-3 py-2 text-sm text-night-200">{r.note}</td>
              <td className="px-3 py-2 text-sm">
                <span className={cn(r.sync === "synced" ? "text-leaf-400" : r.sync === "pending" ? "text-dawn-300" : "text-ember-300")} title={r.refusal}>
                  {syncWords[r.sync]}
                </span>
                {r.refusal ? <span className="block text-xs text-ember-300">{r.refusal}</span> : null}
              </td>
              <td className="whitespace-nowrap px-3 py-1">
                {canEdit(r) ? (
                  <span className="flex gap-1">
                    <Link to={`/rigs/${rigId}/log/${r.id}`} className="inline-flex min-h-11 items-center rounded-lg px-2 font-bold text-dawn-300 underline">
                      Edit<span className="sr-only"> reading of {fmtTime(r.takenAt)}</span>
                    </Link>
                    <button type="button" onClick={() => onDelete(r)} className="inline-flex min-h-11 items-center rounded-lg px-2 font-bold text-ember-300 underline">
                      Delete<span className="sr-only"> reading of {fmtTime(r.takenAt)}</span>
                    </button>
                  </span>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
