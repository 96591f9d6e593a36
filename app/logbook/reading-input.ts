/**
 * Turns the add-reading form into a reading, with messages a person can act on. Accepts a
 * decimal comma ("13,2") and a current given as a size plus a direction (charging or
 * discharging), so nobody has to type a minus sign on a phone keypad.
 */
import { newReadingSchema, READING_LIMITS, type NewReading, type ReadingValueKey } from "~/offline/protocol";

export type ReadingForm = Partial<Record<ReadingValueKey | "takenAt" | "note" | "direction", string>>;
export type ParsedReading = { ok: true; reading: Omit<NewReading, "id"> } | { ok: false; errors: Partial<Record<keyof ReadingForm | "form", string>> };

export function parseNumber(text: string | undefined): number | null | "bad" {
  const t = (text ?? "").trim().replace(/\s+/g, "").replace(",", ".");
  if (t === "") return null;
  if (!/^[-+]?(\d+\.?\d*|\.\d+)$/.test(t)) return "bad";
  return Number(t);
}

/** `local` is a datetime-local value ("2025-10-12T21:40") read in the phone's own time zone. */
export function localInputToIso(local: string | undefined, now = new Date()): string | null {
  if (!local) return now.toISOString();
  const d = new Date(local);
  return isNaN(d.getTime()) ? null : d.toISOString();
}

export function isoToLocalInput(ms: number): string {
  const d = new Date(ms);
  const pad = (n: number) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

export function parseReadingForm(form: ReadingForm, now = new Date()): ParsedReading {
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
  const takenAt = localInputToIso(form.takenAt, now);
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
