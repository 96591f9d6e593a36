import { data, Form, Link, redirect, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/rig.log.$readingId";
import { isoToLocalInput, parseReadingForm, type ReadingForm } from "~/logbook/reading-input";
import { formatDateTime, phoneTimeZone } from "~/lib/datetime";
import { temperatureSymbol, toTemperature } from "~/lib/units";
import { useDisplay } from "~/hooks/use-display";
import { readRigLocal } from "~/offline/rig-data.client";
import { ReadingPhotos } from "~/components/photos/reading-photos";
import { getMeta, localDb } from "~/offline/db.client";
import { deleteReading, editReading } from "~/offline/outbox.client";
import { READING_VALUE_KEYS, type ReadingEdit } from "~/schemas/readings";
import { findReading } from "~/offline/readings-store.client";

/** Edit or delete one reading (its author or an owner), on the phone first. */
export async function clientLoader({ params }: Route.ClientLoaderArgs) {
  const db = localDb();
  const [reading, rig] = await Promise.all([findReading(db, params.readingId), db.rigs.get(params.rigId)]);
  if (!reading || reading.rigId !== params.rigId) throw data({ message: "That reading is not in this phone's logbook." }, { status: 404 });
  const userId = rig?.userId ?? (await getMeta<string | null>(db, "userId", null));
  const mayEdit = rig?.role === "owner" || (rig?.role === "crew" && reading.authorId === userId);
  const timeZone = (await readRigLocal(params.rigId))?.model?.model.timeZone ?? phoneTimeZone();
  return { reading, mayEdit, rigName: rig?.name ?? "Rig", timeZone };
}
clientLoader.hydrate = true as const;

export async function clientAction({ request, params }: Route.ClientActionArgs) {
  const form = Object.fromEntries(await request.formData()) as Record<string, string>;
  const db = localDb();
  if (form.intent === "delete") {
    await deleteReading(db, params.rigId, params.readingId);
    return redirect(`/rigs/${params.rigId}/log`);
  }
  const timeZone = (await readRigLocal(params.rigId))?.model?.model.timeZone ?? phoneTimeZone();
  const parsed = parseReadingForm(
    { ...(form as ReadingForm), direction: Number(form.currentA) >= 0 ? "charging" : "discharging" },
    { timeZone, temperatureUnit: form.temperatureUnit === "f" ? "f" : "c" },
  );
  if (!parsed.ok) return { errors: parsed.errors };
  const before = await findReading(db, params.readingId);
  if (!before) throw data({ message: "That reading is not in this phone's logbook." }, { status: 404 });
  // Only what changed travels, as an explicit edit.
  const set: ReadingEdit = {};
  for (const key of READING_VALUE_KEYS) {
    const next = parsed.reading[key] ?? null;
    if (next !== before[key]) set[key] = next;
  }
  if ((parsed.reading.note ?? "") !== before.note) set.note = parsed.reading.note ?? "";
  if (Date.parse(parsed.reading.takenAt) !== before.takenAt) set.takenAt = parsed.reading.takenAt;
  if (Object.keys(set).length) await editReading(db, params.rigId, params.readingId, set);
  return redirect(`/rigs/${params.rigId}/log`);
}

export function HydrateFallback() {
  return <p role="status" className="p-4 text-night-200">Opening the reading…</p>;
}

export function meta({ loaderData }: Route.MetaArgs) {
  return [{ title: loaderData ? `Reading · Logbook · ${loaderData.rigName} · Tilldawn` : "Reading · Logbook · Tilldawn" }];
}

export default function EditReading({ loaderData, params }: Route.ComponentProps) {
  const { reading, mayEdit, timeZone } = loaderData;
  const { time, units } = useDisplay(timeZone);
  const tUnit = units.temperatureUnit;
  const result = useActionData() as { errors?: Record<string, string> } | undefined;
  const errors = result?.errors ?? {};
  const busy = useNavigation().state === "submitting";
  const fields = [
    { name: "bankVoltageV", label: "Bank voltage", unit: "V" },
    { name: "currentA", label: "Current (+ charging, − discharging)", unit: "A" },
    { name: "socPct", label: "State of charge", unit: "%" },
    { name: "temperatureC", label: "Temperature", unit: temperatureSymbol(tUnit) },
    { name: "solarWhToday", label: "Solar today", unit: "Wh" },
  ] as const;
  const shown = (name: (typeof fields)[number]["name"]) => {
    const v = reading[name];
    if (v === null || v === undefined) return "";
    return name === "temperatureC" ? String(Math.round(toTemperature(v, tUnit) * 10) / 10) : String(v);
  };
  return (
    <div className="space-y-4">
      <p>
        <Link to={`/rigs/${params.rigId}/log`} className="inline-flex min-h-11 items-center font-bold text-night-300 underline">
          ‹ Logbook
        </Link>
      </p>
      <h1 className="text-3xl font-bold">Reading of {formatDateTime(reading.takenAt, time)}</h1>
      {!mayEdit ? (
        <p className="rounded-2xl border border-night-600 bg-night-900 p-4 text-night-200">Only the person who took this reading, or an owner, can change it.</p>
      ) : (
        <>
          <Form method="post" className="space-y-3 rounded-2xl border border-night-700 bg-night-900 p-4" noValidate>
            <input type="hidden" name="intent" value="edit" />
            <input type="hidden" name="temperatureUnit" value={tUnit} />
            <label className="block space-y-1 font-bold">
              Taken at <span className="font-normal text-night-300">(the rig's time, {timeZone})</span>
              <input name="takenAt" type="datetime-local" defaultValue={isoToLocalInput(reading.takenAt, timeZone)} className="block min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-lg" />
            </label>
            {fields.map((f) => (
              <label key={f.name} className="block space-y-1 font-bold">
                {f.label} ({f.unit})
                <input
                  name={f.name}
                  inputMode="decimal"
                  defaultValue={shown(f.name)}
                  aria-invalid={errors[f.name] ? true : undefined}
                  className="block min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-lg tabular"
                />
                {errors[f.name] ? <span className="block text-sm text-ember-300">{errors[f.name]}</span> : null}
              </label>
            ))}
            <label className="block space-y-1 font-bold">
              Note
              <input name="note" maxLength={500} defaultValue={reading.note} className="block min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-lg" />
            </label>
            {errors.form ? <p role="alert" className="font-bold text-ember-300">{errors.form}</p> : null}
            <button type="submit" disabled={busy} className="min-h-14 w-full rounded-xl bg-dawn-500 text-lg font-bold text-night-950">
              Save changes
            </button>
          </Form>
          <Form method="post" onSubmit={(e) => (window.confirm("Delete this reading?") ? undefined : e.preventDefault())}>
            <input type="hidden" name="intent" value="delete" />
            <button type="submit" className="min-h-12 w-full rounded-xl border border-ember-500 font-bold text-ember-300">
              Delete reading
            </button>
          </Form>
        </>
      )}
      <ReadingPhotos rigId={params.rigId} readingId={params.readingId} />
    </div>
  );
}
