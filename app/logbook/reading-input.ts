/**
 * Turns the add-reading form into a reading, with messages a person can act on. Accepts a
 * decimal comma ("13,2") and a current given as a size plus a direction (charging or
 * discharging), so nobody has to type a minus sign on a phone keypad.
 */
import { newReadingSchema, READING_LIMITS, type NewReading, type ReadingValueKey } from "~/schemas/readings";
import { fromLocalInput, toLocalInput } from "~/lib/datetime";
import { parseDecimal } from "~/lib/numbers";
import { fromTemperature, type UnitPrefs } from "~/lib/units";

export type ReadingForm = Partial<Record<ReadingValueKey | "takenAt" | "note" | "direction", string>>;
export type ParsedReading = { ok: true; reading: Omit<NewReading, "id"> } | { ok: false; errors: Partial<Record<keyof ReadingForm | "form", string>> };

export const parseNumber = parseDecimal;

/** How a form is read: the rig's time zone for the typed time, the person's temperature unit. */
export type FormContext = { timeZone: string; temperatureUnit?: UnitPrefs["temperatureUnit"]; now?: Date };

/** `local` is a datetime-local value ("2025-10-12T21:40") read in the rig's time zone. */
export function localInputToIso(local: string | undefined, timeZone: string, now = new Date()): string | null {
  if (!local) return now.toISOString();
  const ms = fromLocalInput(local, timeZone);
  return ms === null ? null : new Date(ms).toISOString();
}

export function isoToLocalInput(ms: number, timeZone: string): string {
  return toLocalInput(ms, timeZone);
}

export function parseReadingForm(form: ReadingForm, context: FormContext): ParsedReading {
  const now = context.now ?? new Date();
  const errors: Partial<Record<keyof ReadingForm | "form", string>> = {};
  const values: Partial<Record<ReadingValueKey, number | null>> = {};
  for (const key of Object.keys(READING_LIMITS) as ReadingValueKey[]) {
    const n = parseNumber(form[key]);
    if (n === "bad") errors[key] = `${READING_LIMITS[key].label}: type a number, e.g. ${key === "bankVoltageV" ? "13.2" : "12"}`;
    else values[key] = n;
  }
  if (typeof values.currentA === "number") {
    const size = Math.abs(values.currentA);
    // An explicit sign typed by the person wins; otherwise the direction buttons decide.
    const typedSign = /^\s*[-+]/.test(form.currentA ?? "");
    values.currentA = typedSign ? values.currentA : form.direction === "charging" ? size : -size;
  }
  if (typeof values.temperatureC === "number" && context.temperatureUnit) {
    values.temperatureC = Math.round(fromTemperature(values.temperatureC, context.temperatureUnit) * 100) / 100;
  }
  const takenAt = localInputToIso(form.takenAt, context.timeZone, now);
  if (!takenAt) errors.takenAt = "Give the date and time the reading was taken";
  if (Object.keys(errors).length) return { ok: false, errors };
  const checked = newReadingSchema.safeParse({ id: crypto.randomUUID(), takenAt, source: "hand", note: (form.note ?? "").trim(), ...values });
  if (!checked.success) {
    for (const issue of checked.error.issues) {
      const key = (issue.path[0] as keyof ReadingForm | undefined) ?? "form";
      errors[key in READING_LIMITS || key === "takenAt" || key === "note" ? key : "form"] ??= issue.message;
    }
    return { ok: false, errors };
  }
  const { id: _id, ...reading } = checked.data;
  return { ok: true, reading };
}
