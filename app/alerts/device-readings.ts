/**
 * The JSON a device posts to POST /api/v1/rigs/:rigId/readings: one reading, or
 * `{ "readings": [ … ] }` with up to 5,000. Each reading is checked on its own (a bad one is
 * refused with its index and reasons; the rest are kept), and against the rig's bank: a
 * voltage must fit the bank's nominal voltage. `deviceReadingJsonSchema` is the same shape as
 * a JSON Schema (served at GET /api/v1/device-readings.schema.json).
 */
import { z } from "zod";
import { issuesOf, type Issue } from "~/engine/issues";
import { EARLIEST_READING_MS, FUTURE_SLACK_MS, READING_LIMITS } from "~/offline/protocol";

export const MAX_DEVICE_BATCH = 5000;

const num = (key: keyof typeof READING_LIMITS) => {
  const { min, max, label, unit } = READING_LIMITS[key];
  // The bank voltage's upper bound comes from the rig's bank (checkDeviceReading), not a fixed 80 V.
  const upper = key === "bankVoltageV" ? Number.MAX_VALUE : max;
  return z
    .number({ error: `${key}: ${label.toLowerCase()} must be a number` })
    .refine(Number.isFinite, `${key} must be a finite number`)
    .min(min, `${key}: ${label.toLowerCase()} must be at least ${min} ${unit}`)
    .max(upper, `${key}: ${label.toLowerCase()} must be at most ${max} ${unit}`)
    .nullable()
    .optional();
};

const noNul = (s: string) => !/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/.test(s);

export const deviceReadingSchema = z
  .object({
    takenAt: z.iso
      .datetime({ offset: true, error: "takenAt: give the time the reading was taken as ISO 8601 with a time zone, e.g. 2026-10-14T21:05:00Z" })
      .refine((s) => Date.parse(s) >= EARLIEST_READING_MS, "takenAt is before the year 2000")
      .refine((s) => Date.parse(s) <= Date.now() + FUTURE_SLACK_MS, "takenAt is in the future"),
    bankVoltageV: num("bankVoltageV"),
    currentA: num("currentA"),
    socPct: num("socPct"),
    temperatureC: num("temperatureC"),
    solarWhToday: num("solarWhToday"),
    note: z.string().max(500, "note: keep it under 500 characters").refine(noNul, "note contains control characters (such as NUL)").optional(),
  })
  .strict()
  .refine((r) => ["bankVoltageV", "currentA", "socPct", "temperatureC", "solarWhToday"].some((k) => r[k as keyof typeof r] !== null && r[k as keyof typeof r] !== undefined), {
    message: "A reading needs at least one of bankVoltageV, currentA, socPct, temperatureC, solarWhToday",
  });
export type DeviceReading = z.infer<typeof deviceReadingSchema>;

/** The envelope: a batch or a single reading (each item is checked separately). */
export const deviceEnvelopeSchema = z.union([
  z.object({ readings: z.array(z.unknown()).min(1, "Send at least one reading").max(MAX_DEVICE_BATCH, `At most ${MAX_DEVICE_BATCH} readings per request`) }).strict(),
  z.record(z.string(), z.unknown()).refine((o) => !("readings" in o), "readings must be an array"),
]);

/** Bank voltages a bank of this nominal voltage can show: 0 to 1.4 × nominal (16.8 V for 12 V; covers lead-acid equalisation, trade practice). */
export function voltageRange(nominalV: number) {
  return { min: 0, max: Math.round(nominalV * 1.4 * 10) / 10 };
}

export type ReadingIssue = Issue;

/** Checks one item; answers the reading or its issues (paths relative to the reading). */
export function checkDeviceReading(item: unknown, nominalV: number): { ok: true; reading: DeviceReading } | { ok: false; issues: ReadingIssue[] } {
  const parsed = deviceReadingSchema.safeParse(item);
  if (!parsed.success) {
    return { ok: false, issues: issuesOf(parsed.error) };
  }
  const r = parsed.data;
  const range = voltageRange(nominalV);
  if (r.bankVoltageV !== null && r.bankVoltageV !== undefined && (r.bankVoltageV < range.min || r.bankVoltageV > range.max)) {
    return {
      ok: false,
      issues: [{ path: ["bankVoltageV"], message: `bankVoltageV ${r.bankVoltageV} V cannot come from this rig's ${nominalV} V bank (expected ${range.min}–${range.max} V)` }],
    };
  }
  return { ok: true, reading: r };
}

export const deviceReadingJsonSchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "/api/v1/device-readings.schema.json",
  title: "Tilldawn device readings",
  description: "POST /api/v1/rigs/{rigId}/readings with Authorization: Bearer <device token>. One reading, or { readings: [...] } (1 to 5000). Idempotent on (device, takenAt).",
  oneOf: [{ $ref: "#/$defs/reading" }, { type: "object", additionalProperties: false, required: ["readings"], properties: { readings: { type: "array", minItems: 1, maxItems: MAX_DEVICE_BATCH, items: { $ref: "#/$defs/reading" } } } }],
  $defs: {
    reading: z.toJSONSchema(deviceReadingSchema, { io: "input", unrepresentable: "any" }),
  },
};
