import { useEffect, useRef, useState } from "react";
import { Form, useActionData, useNavigation } from "react-router";
import { cn } from "~/lib/cn";
import { isoToLocalInput } from "~/logbook/reading-input";
import { temperatureSymbol, type UnitPrefs } from "~/lib/units";

type Errors = Partial<Record<string, string>>;

function NumberField({ name, label, unit, hint, error, defaultValue }: { name: string; label: string; unit: string; hint?: string; error?: string; defaultValue?: string }) {
  const id = `reading-${name}`;
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-bold text-night-200">
        {label}
      </label>
      <div className={cn("flex min-h-12 items-center rounded-xl border bg-night-950", error ? "border-ember-500" : "border-night-600")}>
        <input
          id={id}
          name={name}
          inputMode="decimal"
          autoComplete="off"
          defaultValue={defaultValue}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : undefined}
          className="min-w-0 flex-1 bg-transparent px-3 text-lg tabular text-night-100 outline-none"
        />
        <span className="pr-3 text-night-300" aria-hidden="true">
          {unit}
        </span>
      </div>
      {hint && !error ? (
        <p id={`${id}-hint`} className="text-xs text-night-300">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${id}-error`} className="text-sm font-bold text-ember-300">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** Add a reading in a few taps: voltage, current (size + direction), SoC; the rest is optional. */
export function ReadingForm({ canWrite, timeZone, temperatureUnit }: { canWrite: boolean; timeZone: string; temperatureUnit: UnitPrefs["temperatureUnit"] }) {
  const result = useActionData() as { ok: boolean; errors?: Errors; savedAt?: number } | undefined;
  const navigation = useNavigation();
  const busy = navigation.state === "submitting" && navigation.formData?.get("intent") === "add";
  const formRef = useRef<HTMLFormElement>(null);
  const [direction, setDirection] = useState<"discharging" | "charging">("discharging");
  const [more, setMore] = useState(false);
  const [nowValue, setNowValue] = useState("");
  useEffect(() => setNowValue(isoToLocalInput(Date.now(), timeZone)), [result?.savedAt, timeZone]);
  useEffect(() => {
    if (result?.ok) formRef.current?.reset();
  }, [result]);
  const errors = result && !result.ok ? (result.errors ?? {}) : {};

  if (!canWrite) {
    return <p className="rounded-2xl border border-night-600 bg-night-900 p-4 text-night-200">You follow this rig as a guest: the logbook is read-only.</p>;
  }
  return (
    <Form method="post" ref={formRef} className="space-y-4 rounded-2xl border border-night-700 bg-night-900 p-4" aria-labelledby="add-reading-heading" noValidate>
      <h2 id="add-reading-heading" className="text-xl font-bold">
        Add a reading
      </h2>
      <input type="hidden" name="intent" value="add" />
      <input type="hidden" name="direction" value={direction} />
      <input type="hidden" name="temperatureUnit" value={temperatureUnit} />
      <div className="grid grid-cols-2 gap-3">
        <NumberField name="bankVoltageV" label="Bank voltage" unit="V" error={errors.bankVoltageV} />
        <NumberField name="socPct" label="State of charge" unit="%" error={errors.socPct} />
        <div className="col-span-2 space-y-1">
          <NumberField name="currentA" label="Current" unit="A" error={errors.currentA} hint="The size of the current; choose its direction below." />
          <div role="radiogroup" aria-label="Current direction" className="grid grid-cols-2 gap-2">
            {(["discharging", "charging"] as const).map((d) => (
              <button
                key={d}
                type="button"
                role="radio"
                aria-checked={direction === d}
                onClick={() => setDirection(d)}
                className={cn(
                  "min-h-12 rounded-xl border font-bold",
                  direction === d ? "border-dawn-500 bg-night-800 text-dawn-300" : "border-night-600 text-night-300",
                )}
              >
                {d === "discharging" ? "− Discharging" : "+ Charging"}
              </button>
            ))}
          </div>
        </div>
      </div>
      <details open={more || Boolean(errors.temperatureC || errors.solarWhToday || errors.takenAt || errors.note)} onToggle={(e) => setMore(e.currentTarget.open)}>
        <summary className="min-h-12 cursor-pointer py-3 font-bold text-night-200">Time, temperature, solar, note</summary>
        <div className="grid grid-cols-2 gap-3 pt-2">
          <div className="col-span-2 space-y-1">
            <label htmlFor="reading-takenAt" className="block text-sm font-bold text-night-200">
              Taken at <span className="font-normal text-night-300">(the rig's time, {timeZone})</span>
            </label>
            <input
              id="reading-takenAt"
              name="takenAt"
              type="datetime-local"
              key={nowValue}
              defaultValue={nowValue}
              aria-invalid={errors.takenAt ? true : undefined}
              className="block min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-lg text-night-100"
            />
            {errors.takenAt ? <p className="text-sm font-bold text-ember-300">{errors.takenAt}</p> : null}
          </div>
          <NumberField name="temperatureC" label="Temperature" unit={temperatureSymbol(temperatureUnit)} error={errors.temperatureC} />
          <NumberField name="solarWhToday" label="Solar today" unit="Wh" error={errors.solarWhToday} />
          <div className="col-span-2 space-y-1">
            <label htmlFor="reading-note" className="block text-sm font-bold text-night-200">
              Note
            </label>
            <input
              id="reading-note"
              name="note"
              maxLength={500}
              placeholder="e.g. after the fridge cycled"
              className="block min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-lg text-night-100 placeholder:text-night-500"
            />
          </div>
        </div>
      </details>
      {errors.form ? (
        <p role="alert" className="text-sm font-bold text-ember-300">
          {errors.form}
        </p>
      ) : null}
      {Object.keys(errors).length && !errors.form ? (
        <p role="alert" className="text-sm font-bold text-ember-300">
          Check the marked fields; nothing was saved yet.
        </p>
      ) : null}
      <button type="submit" disabled={busy} className="min-h-14 w-full rounded-xl bg-dawn-500 text-lg font-bold text-night-950 hover:bg-dawn-400 disabled:opacity-60">
        {busy ? "Saving…" : "Save reading"}
      </button>
      {result?.ok ? (
        <p role="status" className="text-sm font-bold text-leaf-400">
          Reading saved on this phone.
        </p>
      ) : null}
    </Form>
  );
}
