import { useMemo, useState } from "react";
import { data, Link, redirect } from "react-router";
import type { Route } from "./+types/rig.log";
import { ReadingForm } from "~/components/log/reading-form";
import { ReadingChart, type ChartSeries } from "~/components/log/reading-chart";
import { ReadingsTable, type TableFilter } from "~/components/log/readings-table";
import { parseReadingForm, type ReadingForm as ReadingFormValues } from "~/logbook/reading-input";
import { healthTrend } from "~/logbook/health";
import { SyncStatusBar } from "~/components/sync-status";
import { getMeta, localDb, type LocalReading } from "~/offline/db.client";
import { useLiveQuery } from "dexie-react-hooks";
import { useDisplay } from "~/hooks/use-display";
import { fromLocal, phoneTimeZone } from "~/lib/datetime";
import { count } from "~/logbook/format";
import { addReadings, deleteReading } from "~/offline/outbox.client";
import { fetchRig, readRigLocal } from "~/offline/rig-data.client";
import { readingsInRange } from "~/offline/readings-store.client";

const DAY_MS = 86_400_000;
const PAGE = 25;

/**
 * The logbook works offline: everything is read from and written to the phone's store; the
 * sync runner carries the changes to the server. The server is asked only when this phone has
 * never seen the rig (or, in the background, to refresh it).
 */
export async function clientLoader({ params, request }: Route.ClientLoaderArgs) {
  const rigId = params.rigId;
  let snap = await readRigLocal(rigId);
  if (!snap) {
    const outcome = await fetchRig(rigId);
    if (outcome === "signed-out") {
      const url = new URL(request.url);
      throw redirect(`/sign-in?${new URLSearchParams({ redirectTo: url.pathname })}`);
    }
    if (outcome === "not-found") throw data({ message: "There is no such rig, or it is not shared with you." }, { status: 404 });
    snap = await readRigLocal(rigId);
    if (!snap) {
      throw data({ message: "This rig has not been opened on this phone yet. Open it once with a connection to keep it for offline use." }, { status: 503 });
    }
  } else if (navigator.onLine && Date.now() - snap.rig.seenAt > 60_000) {
    void fetchRig(rigId);
  }
  const userId = snap.rig.userId ?? (await getMeta<string | null>(localDb(), "userId", null));
  const model = snap.model?.model ?? null;
  return { rigId, name: snap.rig.name, role: snap.rig.role, userId, model, timeZone: model?.timeZone ?? phoneTimeZone() };
}
clientLoader.hydrate = true as const;

export async function clientAction({ request, params }: Route.ClientActionArgs) {
  const form = Object.fromEntries(await request.formData()) as Record<string, string>;
  const db = localDb();
  const rig = await db.rigs.get(params.rigId);
  const userId = rig?.userId ?? (await getMeta<string | null>(db, "userId", null));
  if (form.intent === "delete" && form.readingId) {
    await deleteReading(db, params.rigId, form.readingId);
    return { ok: true as const, savedAt: Date.now() };
  }
  const model = (await readRigLocal(params.rigId))?.model?.model;
  const parsed = parseReadingForm(form as ReadingFormValues, {
    timeZone: model?.timeZone ?? phoneTimeZone(),
    temperatureUnit: form.temperatureUnit === "f" ? "f" : "c",
  });
  if (!parsed.ok) return { ok: false as const, errors: parsed.errors };
  await addReadings(db, params.rigId, [parsed.reading], userId);
  return { ok: true as const, savedAt: Date.now() };
}

export function HydrateFallback() {
  return (
    <p role="status" className="p-4 text-night-200">
      Opening the logbook…
    </p>
  );
}

export function meta({ loaderData }: Route.MetaArgs) {
  return [{ title: loaderData ? `Logbook · ${loaderData.name} · Tilldawn` : "Logbook · Tilldawn" }];
}

const ranges = [
  { id: "day", label: "Day", ms: DAY_MS },
  { id: "week", label: "Week", ms: 7 * DAY_MS },
  { id: "month", label: "Month", ms: 30 * DAY_MS },
  { id: "year", label: "Year", ms: 365 * DAY_MS },
] as const;
type RangeId = (typeof ranges)[number]["id"];

export default function Logbook({ loaderData }: Route.ComponentProps) {
  const { rigId, name, role, userId, model, timeZone } = loaderData;
  const display = useDisplay(timeZone);
  const canWrite = role !== "guest";
  const [range, setRange] = useState<RangeId>("week");
  const [filter, setFilter] = useState<TableFilter>({ from: "", to: "", source: "", only: "" });
  const [page, setPage] = useState(0);
  const [server, setServer] = useState<{ range: RangeId; series: ChartSeries; bucketS: number } | null>(null);

  // The phone's readings, re-read whenever the local store changes (Dexie's liveQuery).
  const live = useLiveQuery(() => readingsInRange(localDb(), rigId), [rigId]);
  const all = { data: live ?? ([] as LocalReading[]), loading: live === undefined };

  const filtered = useMemo(() => {
    // The filter's days are the rig's calendar days.
    const from = filter.from ? (fromLocal(`${filter.from}T00:00:00`, timeZone, "yyyy-MM-dd'T'HH:mm:ss") ?? -Infinity) : -Infinity;
    const to = filter.to ? (fromLocal(`${filter.to}T23:59:59`, timeZone, "yyyy-MM-dd'T'HH:mm:ss") ?? Infinity) : Infinity;
    return all.data.filter(
      (r) =>
        r.takenAt >= from &&
        r.takenAt <= to &&
        (!filter.source || r.source === filter.source) &&
        (!filter.only || (filter.only === "waiting" ? r.sync === "pending" : r.sync === "refused")),
    );
  }, [all.data, filter, timeZone]);
  const pages = Math.max(1, Math.ceil(filtered.length / PAGE));
  const shown = filtered.slice(page * PAGE, page * PAGE + PAGE);

  const span = ranges.find((r) => r.id === range)!.ms;
  const localSeries = useMemo<ChartSeries>(() => {
    const since = Date.now() - span;
    const rows = all.data.filter((r) => r.takenAt >= since).reverse();
    return { t: rows.map((r) => r.takenAt), v: rows.map((r) => r.bankVoltageV), soc: rows.map((r) => r.socPct) };
  }, [all.data, span]);

  async function loadServerSeries(id: RangeId) {
    setRange(id);
    const ms = ranges.find((r) => r.id === id)!.ms;
    if (ms <= 30 * DAY_MS || !navigator.onLine) return;
    try {
      const to = new Date();
      const from = new Date(to.getTime() - ms);
      const res = await fetch(`/api/rigs/${rigId}/readings?${new URLSearchParams({ view: "series", from: from.toISOString(), to: to.toISOString(), points: "600" })}`);
      if (!res.ok) return;
      const body = (await res.json()) as { bucketS: number; points: Array<{ t: number; bankVoltageV: number | null; socPct: number | null }> };
      setServer({ range: id, bucketS: body.bucketS, series: { t: body.points.map((p) => p.t), v: body.points.map((p) => p.bankVoltageV), soc: body.points.map((p) => p.socPct) } });
    } catch {
      /* offline: the phone's own readings are drawn */
    }
  }
  const series = server && server.range === range ? server.series : localSeries;

  const house = model?.banks.find((b) => b.role === "house") ?? model?.banks[0];
  const trend = useMemo(() => (house ? healthTrend(house, all.data, timeZone) : []), [house, all.data, timeZone]);

  const canEdit = (r: LocalReading) => canWrite && (role === "owner" || (r.authorId !== null && r.authorId === userId));
  const remove = async (r: LocalReading) => {
    if (!window.confirm("Delete this reading? Others on the rig will no longer see it.")) return;
    await deleteReading(localDb(), rigId, r.id);
  };

  return (
    <div className="space-y-6">
      <header className="space-y-2">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">
          <Link to={`/rigs/${rigId}`} className="underline">
            {name}
          </Link>
        </p>
        <h1 className="text-3xl font-bold">Logbook</h1>
        <SyncStatusBar />
      </header>

      <ReadingForm canWrite={canWrite} timeZone={timeZone} temperatureUnit={display.units.temperatureUnit} />

      <section aria-labelledby="chart-heading" className="space-y-3 rounded-2xl border border-night-700 bg-night-900 p-4">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <h2 id="chart-heading" className="text-xl font-bold">
            Voltage and SoC
          </h2>
          <div role="group" aria-label="Chart range" className="flex gap-1">
            {ranges.map((r) => (
              <button
                key={r.id}
                type="button"
                aria-pressed={range === r.id}
                onClick={() => void loadServerSeries(r.id)}
                className={`min-h-11 rounded-lg px-3 font-bold ${range === r.id ? "bg-night-700 text-dawn-300" : "text-night-300"}`}
              >
                {r.label}
              </button>
            ))}
          </div>
        </div>
        {series.t.length ? (
          <ReadingChart data={series} time={display.time} label={`Bank voltage and state of charge over the last ${range}: ${count(series.t.length, "point")}`} />
        ) : (
          <p className="text-night-300">{all.loading ? "Reading the logbook…" : "No readings in this range yet."}</p>
        )}
        {server && server.range === range && server.bucketS > 0 ? (
          <p className="text-xs text-night-300">Each point is the mean of {Math.round(server.bucketS / 60)} minutes of readings (drawn from the server).</p>
        ) : null}
      </section>

      <section aria-labelledby="health-heading" className="space-y-2 rounded-2xl border border-night-700 bg-night-900 p-4">
        <h2 id="health-heading" className="text-xl font-bold">
          Bank health
        </h2>
        {trend.some((p) => p.estimate.ok) ? (
          <ul className="space-y-1 tabular">
            {trend.map((p) => (
              <li key={p.month} className="flex justify-between gap-3">
                <span>{p.month}</span>
                <span title={p.estimate.note}>
                  {p.estimate.ok ? `${p.estimate.capacityAh!.toFixed(0)} Ah · ${p.estimate.healthPct!.toFixed(0)} % of rated · ${p.estimate.confidence} confidence` : "not enough readings"}
                </span>
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-night-300">
            Not enough readings for a capacity estimate yet. Log the resting voltage (current near 0 A for an hour) before and after a
            discharge, with the current logged in between.
          </p>
        )}
      </section>

      <section aria-labelledby="table-heading" className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-2">
          <h2 id="table-heading" className="text-xl font-bold">
            Readings <span className="tabular text-night-300">({filtered.length})</span>
          </h2>
          <div className="flex flex-wrap gap-2">
            {canWrite ? (
              <Link to={`/rigs/${rigId}/log/import`} className="inline-flex min-h-11 items-center rounded-xl border border-night-600 px-3 font-bold hover:border-dawn-500">
                Import CSV
              </Link>
            ) : null}
            <a href={`/api/rigs/${rigId}/readings.csv`} download className="inline-flex min-h-11 items-center rounded-xl border border-night-600 px-3 font-bold hover:border-dawn-500">
              Export CSV
            </a>
          </div>
        </div>
        <fieldset className="grid grid-cols-2 gap-2 md:grid-cols-4">
          <legend className="sr-only">Filter readings</legend>
          <label className="space-y-1 text-sm font-bold text-night-200">
            From
            <input type="date" value={filter.from} onChange={(e) => (setFilter({ ...filter, from: e.target.value }), setPage(0))} className="block min-h-11 w-full rounded-lg border border-night-600 bg-night-950 px-2 text-night-100" />
          </label>
          <label className="space-y-1 text-sm font-bold text-night-200">
            To
            <input type="date" value={filter.to} onChange={(e) => (setFilter({ ...filter, to: e.target.value }), setPage(0))} className="block min-h-11 w-full rounded-lg border border-night-600 bg-night-950 px-2 text-night-100" />
          </label>
          <label className="space-y-1 text-sm font-bold text-night-200">
            Source
            <select value={filter.source} onChange={(e) => (setFilter({ ...filter, source: e.target.value as TableFilter["source"] }), setPage(0))} className="block min-h-11 w-full rounded-lg border border-night-600 bg-night-950 px-2 text-night-100">
              <option value="">All</option>
              <option value="hand">By hand</option>
              <option value="csv">CSV import</option>
              <option value="device">Device</option>
            </select>
          </label>
          <label className="space-y-1 text-sm font-bold text-night-200">
            Show
            <select value={filter.only} onChange={(e) => (setFilter({ ...filter, only: e.target.value as TableFilter["only"] }), setPage(0))} className="block min-h-11 w-full rounded-lg border border-night-600 bg-night-950 px-2 text-night-100">
              <option value="">Every reading</option>
              <option value="waiting">Saved on phone only</option>
              <option value="refused">Not accepted</option>
            </select>
          </label>
        </fieldset>
        {all.loading ? (
          <p role="status" className="text-night-300">Reading the logbook…</p>
        ) : shown.length === 0 ? (
          <p className="rounded-2xl border border-night-700 bg-night-900 p-4 text-night-200">
            {all.data.length ? "No readings match these filters." : "No readings yet. Add the first one above — it is saved on this phone at once."}
          </p>
        ) : (
          <ReadingsTable rows={shown} rigId={rigId} canEdit={canEdit} onDelete={(r) => void remove(r)} time={display.time} units={display.units} />
        )}
        {pages > 1 ? (
          <nav aria-label="Pages of readings" className="flex items-center justify-between gap-2">
            <button type="button" disabled={page === 0} onClick={() => setPage(page - 1)} className="min-h-11 rounded-xl border border-night-600 px-4 font-bold disabled:opacity-40">
              Newer
            </button>
            <span className="tabular text-night-300">
              Page {page + 1} of {pages}
            </span>
            <button type="button" disabled={page >= pages - 1} onClick={() => setPage(page + 1)} className="min-h-11 rounded-xl border border-night-600 px-4 font-bold disabled:opacity-40">
              Older
            </button>
          </nav>
        ) : null}
        <p className="text-xs text-night-300">This phone keeps the last 90 days of readings; the export has them all.</p>
      </section>
    </div>
  );
}
