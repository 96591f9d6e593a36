import { useMemo, useState } from "react";
import { data, Link, redirect } from "react-router";
import Papa from "papaparse";
import type { Route } from "./+types/rig.log.import";
import { convertRows, detectUnits, FIELDS, guessMapping, type Converted, type Field, type Mapping, type Units } from "~/logbook/csv-import";
import { count, fmt, fmtCurrent, fmtTemperature } from "~/logbook/format";
import { formatDateTime, phoneTimeZone } from "~/lib/datetime";
import { useDisplay } from "~/hooks/use-display";
import { fetchRig, readRigLocal } from "~/offline/rig-data.client";
import { getMeta, localDb } from "~/offline/db.client";
import { addReadings } from "~/offline/outbox.client";
import { readingsInRange } from "~/offline/readings-store.client";

/** Largest file read (a year of 5-minute readings is about 6 MB). */
const MAX_BYTES = 40 * 1024 * 1024;
const WRITE_CHUNK = 1000;

export async function clientLoader({ params, request }: Route.ClientLoaderArgs) {
  let snap = await readRigLocal(params.rigId);
  if (!snap) {
    // A direct link in a browser that has never opened this rig: fetch it first, as the logbook does.
    const outcome = await fetchRig(params.rigId);
    if (outcome === "signed-out") throw redirect(`/sign-in?${new URLSearchParams({ redirectTo: new URL(request.url).pathname })}`);
    if (outcome === "not-found") throw data({ message: "There is no such rig, or it is not shared with you." }, { status: 404 });
    snap = await readRigLocal(params.rigId);
    if (!snap) throw data({ message: "This rig has not been opened on this phone yet. Open it once with a connection to import readings offline." }, { status: 503 });
  }
  const { rig } = snap;
  return {
    rigId: rig.id,
    name: rig.name,
    guest: rig.role === "guest",
    timeZone: snap.model?.model.timeZone ?? phoneTimeZone(),
    userId: rig.userId ?? (await getMeta<string | null>(localDb(), "userId", null)),
  };
}

export function meta({ loaderData }: Route.MetaArgs) {
  return [{ title: loaderData ? `Import readings · ${loaderData.name} · Tilldawn` : "Import readings · Tilldawn" }];
}
clientLoader.hydrate = true as const;

export function HydrateFallback() {
  return <p role="status" className="p-4 text-night-200">Opening the import…</p>;
}

type Parsed = { name: string; headers: string[]; rows: string[][] };

const unitChoices: Array<{ key: keyof Omit<Units, "invertCurrent">; label: string; options: Array<[string, string]> }> = [
  { key: "time", label: "Time written as", options: [["iso", "2025-10-12 21:00 (year first)"], ["dmy", "12/10/2025 (day first)"], ["mdy", "10/12/2025 (month first)"], ["ymd", "2025/10/12"], ["epoch-s", "Seconds since 1970"], ["epoch-ms", "Milliseconds since 1970"]] },
  { key: "voltage", label: "Voltage in", options: [["V", "volts (V)"], ["mV", "millivolts (mV)"]] },
  { key: "current", label: "Current in", options: [["A", "amps (A)"], ["mA", "milliamps (mA)"]] },
  { key: "soc", label: "SoC as", options: [["pct", "percent (0–100)"], ["fraction", "fraction (0–1)"]] },
  { key: "temperature", label: "Temperature in", options: [["C", "°C"], ["F", "°F"], ["K", "kelvin"]] },
  { key: "solar", label: "Solar in", options: [["Wh", "Wh"], ["kWh", "kWh"]] },
];

export default function ImportReadings({ loaderData }: Route.ComponentProps) {
  const { rigId, name, userId, guest, timeZone } = loaderData;
  const { time, units: shownUnits } = useDisplay(timeZone);
  const [file, setFile] = useState<Parsed | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [mapping, setMapping] = useState<Mapping>({});
  const [units, setUnits] = useState<Units | null>(null);
  const [checked, setChecked] = useState<Converted | null>(null);
  const [progress, setProgress] = useState<{ done: number; total: number } | null>(null);
  const [finished, setFinished] = useState<number | null>(null);

  function read(f: File) {
    setProblem(null);
    setChecked(null);
    setFinished(null);
    if (f.size > MAX_BYTES) return setProblem(`That file is ${(f.size / 1048576).toFixed(0)} MB; split it into files under 40 MB.`);
    Papa.parse<string[]>(f, {
      skipEmptyLines: true,
      worker: false,
      complete: (result) => {
        const [headers, ...rows] = result.data;
        if (!headers || rows.length === 0) return setProblem("This file has no rows under its header. Is it a CSV export with a header row?");
        const m = guessMapping(headers);
        setFile({ name: f.name, headers, rows });
        setMapping(m);
        setUnits(detectUnits(headers, rows.slice(0, 500), m));
      },
      error: (err) => setProblem(`The file could not be read: ${err.message}`),
    });
  }

  async function check() {
    if (!file || !units) return;
    const db = localDb();
    const existing = new Set((await readingsInRange(db, rigId)).map((r) => r.takenAt));
    setChecked(await convertRows(rigId, file.rows, mapping, units, existing, timeZone));
  }

  async function save() {
    if (!checked) return;
    const total = checked.readings.length;
    setProgress({ done: 0, total });
    for (let i = 0; i < total; i += WRITE_CHUNK) {
      await addReadings(localDb(), rigId, checked.readings.slice(i, i + WRITE_CHUNK), userId);
      setProgress({ done: Math.min(total, i + WRITE_CHUNK), total });
    }
    setFinished(total);
    setChecked(null);
    setFile(null);
  }

  const preview = useMemo(() => checked?.readings.slice(0, 8) ?? [], [checked]);

  if (guest) {
    return (
      <div className="space-y-5">
        <BackToLog rigId={rigId} name={name} />
        <h1 className="text-3xl font-bold">Importing is for the rig's crew</h1>
        <p className="text-night-200">
          You follow {name} as a guest, so you can read its logbook but not add to it. You can still read every reading in the logbook, or take
          them all away as a CSV file. To import readings, ask one of the rig's owners to make you crew on its People page.
        </p>
        <p className="flex flex-wrap gap-3">
          <Link to={`/rigs/${rigId}/log`} className="inline-flex min-h-12 items-center rounded-xl bg-dawn-500 px-5 font-bold text-night-950">
            Open the logbook
          </Link>
          <a href={`/api/rigs/${rigId}/readings.csv`} download className="inline-flex min-h-12 items-center rounded-xl border border-night-600 px-5 font-bold">
            Export the readings as CSV
          </a>
        </p>
      </div>
    );
  }

  return (
    <div className="space-y-5">
      <BackToLog rigId={rigId} name={name} />
      <h1 className="text-3xl font-bold">Import readings from a CSV file</h1>
      <p className="text-night-200">
        Any battery monitor's CSV export with a header row works: choose which column is which, check the units, look at the preview, then import.
        Rows already in the logbook are skipped, so importing the same file twice doubles nothing.
      </p>

      <label className="block space-y-2 rounded-2xl border border-dashed border-night-600 bg-night-900 p-4 font-bold">
        1. Choose the file
        <input type="file" accept=".csv,text/csv,text/plain" onChange={(e) => e.target.files?.[0] && read(e.target.files[0])} className="block w-full text-night-200 file:mr-3 file:min-h-11 file:rounded-lg file:border-0 file:bg-dawn-500 file:px-3 file:font-bold file:text-night-950" />
      </label>
      {problem ? <p role="alert" className="font-bold text-ember-300">{problem}</p> : null}

      {file && units ? (
        <section aria-labelledby="map-heading" className="space-y-3 rounded-2xl border border-night-700 bg-night-900 p-4">
          <h2 id="map-heading" className="text-xl font-bold">
            2. Match the columns <span className="text-sm font-normal text-night-300">({count(file.rows.length, "row")} in {file.name})</span>
          </h2>
          <div className="grid gap-3 md:grid-cols-2">
            {FIELDS.map(({ field, label }) => (
              <label key={field} className="block space-y-1 text-sm font-bold text-night-200">
                {label}
                <select
                  value={mapping[field] ?? ""}
                  onChange={(e) => {
                    const next = { ...mapping };
                    if (e.target.value === "") delete next[field as Field];
                    else next[field as Field] = Number(e.target.value);
                    setMapping(next);
                    setUnits(detectUnits(file.headers, file.rows.slice(0, 500), next));
                    setChecked(null);
                  }}
                  className="block min-h-11 w-full rounded-lg border border-night-600 bg-night-950 px-2 text-night-100"
                >
                  <option value="">{field === "takenAt" ? "Choose a column" : "Not in this file"}</option>
                  {file.headers.map((h, i) => (
                    <option key={i} value={i}>
                      {h || `Column ${i + 1}`} — e.g. {file.rows[0]?.[i] ?? ""}
                    </option>
                  ))}
                </select>
              </label>
            ))}
          </div>
          <h3 className="pt-2 font-bold">Units (detected — change them if they are wrong)</h3>
          <div className="grid gap-3 md:grid-cols-3">
            {unitChoices.map((u) => (
              <label key={u.key} className="block space-y-1 text-sm font-bold text-night-200">
                {u.label}
                <select value={units[u.key]} onChange={(e) => (setUnits({ ...units, [u.key]: e.target.value }), setChecked(null))} className="block min-h-11 w-full rounded-lg border border-night-600 bg-night-950 px-2 text-night-100">
                  {u.options.map(([value, text]) => (
                    <option key={value} value={value}>
                      {text}
                    </option>
                  ))}
                </select>
              </label>
            ))}
            <label className="flex min-h-11 items-center gap-2 text-sm font-bold text-night-200">
              <input type="checkbox" checked={units.invertCurrent} onChange={(e) => (setUnits({ ...units, invertCurrent: e.target.checked }), setChecked(null))} className="size-6" />
              The file shows discharge as positive
            </label>
          </div>
          <button type="button" onClick={() => void check()} disabled={mapping.takenAt === undefined} className="min-h-12 rounded-xl bg-dawn-500 px-5 font-bold text-night-950 disabled:opacity-50">
            3. Check and preview
          </button>
        </section>
      ) : null}

      {checked ? (
        <section aria-labelledby="preview-heading" className="space-y-3 rounded-2xl border border-night-700 bg-night-900 p-4">
          <h2 id="preview-heading" className="text-xl font-bold">
            Preview
          </h2>
          <p role="status" className="tabular">
            {count(checked.readings.length, "reading")} to import · {count(checked.duplicates, "row")} already in the logbook (skipped)
            {checked.repeated ? ` · ${count(checked.repeated, "row")} repeating a time earlier in this file (skipped)` : ""} ·{" "}
            {count(checked.errors.length, "row")} with problems
          </p>
          {preview.length ? (
            <ul className="divide-y divide-night-800 tabular text-sm">
              {preview.map((r) => (
                <li key={r.id} className="flex flex-wrap gap-x-4 py-1">
                  <span>{formatDateTime(Date.parse(r.takenAt), time)}</span>
                  <span>{fmt(r.bankVoltageV ?? null, 2, "V")}</span>
                  <span>{fmtCurrent(r.currentA ?? null)}</span>
                  <span>{fmt(r.socPct ?? null, 0, "%")}</span>
                  <span>{fmtTemperature(r.temperatureC ?? null, shownUnits)}</span>
                  <span>{fmt(r.solarWhToday ?? null, 0, "Wh")}</span>
                </li>
              ))}
            </ul>
          ) : null}
          {checked.errors.length ? (
            <details open={checked.errors.length <= 5}>
              <summary className="min-h-11 cursor-pointer py-2 font-bold text-ember-300">Rows that will not be imported</summary>
              <ul className="max-h-64 overflow-y-auto text-sm text-ember-300">
                {checked.errors.slice(0, 200).map((e) => (
                  <li key={e.row}>
                    Row {e.row}: {e.message}
                  </li>
                ))}
                {checked.errors.length > 200 ? <li>…and {count(checked.errors.length - 200, "more row", "more rows")}.</li> : null}
              </ul>
            </details>
          ) : null}
          <button type="button" onClick={() => void save()} disabled={!checked.readings.length || progress !== null && finished === null} className="min-h-14 w-full rounded-xl bg-dawn-500 text-lg font-bold text-night-950 disabled:opacity-50">
            Import {count(checked.readings.length, "reading")}
          </button>
        </section>
      ) : null}

      {progress ? (
        <div className="space-y-1">
          <label htmlFor="import-progress" className="font-bold">
            Saving on this phone: {progress.done.toLocaleString()} of {progress.total.toLocaleString()}
          </label>
          <progress id="import-progress" value={progress.done} max={Math.max(1, progress.total)} className="h-4 w-full accent-dawn-500" />
        </div>
      ) : null}
      {finished !== null ? (
        <p role="status" className="rounded-2xl border border-leaf-400 bg-night-900 p-4">
          {count(finished, "reading")} saved on this phone; {finished === 1 ? "it syncs" : "they sync"} to the server in the background.{" "}
          <Link to={`/rigs/${rigId}/log`} className="font-bold underline">
            Back to the logbook
          </Link>
        </p>
      ) : null}
    </div>
  );
}

function BackToLog({ rigId, name }: { rigId: string; name: string }) {
  return (
    <p>
      <Link to={`/rigs/${rigId}/log`} className="inline-flex min-h-11 items-center font-bold text-night-300 underline">
        ‹ Logbook of {name}
      </Link>
    </p>
  );
}
