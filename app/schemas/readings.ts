/**
 * A logbook reading, declared once: its value keys and their bounds, its sources (which also
 * feed the database's `reading_source` enum), and the zod schemas the forms, CSV import, the
 * sync API and the phone share. Every field is checked to what its column can hold: values
 * finite, within the physical range and storable in PostgreSQL's `real`; text without NUL and
 * with a length limit; times within a sane window.
 */
import { z } from "zod";

/** Bounds of a plausible reading; outside them the input is refused with a clear message. */
export const READING_LIMITS = {
  bankVoltageV: { min: 0, max: 80, label: "Bank voltage", unit: "V" },
  currentA: { min: -2000, max: 2000, label: "Current", unit: "A" },
  socPct: { min: 0, max: 100, label: "State of charge", unit: "%" },
  temperatureC: { min: -50, max: 90, label: "Temperature", unit: "°C" },
  solarWhToday: { min: 0, max: 200_000, label: "Solar today", unit: "Wh" },
} as const;

export type ReadingValueKey = keyof typeof READING_LIMITS;
export const READING_VALUE_KEYS = Object.keys(READING_LIMITS) as ReadingValueKey[];

/** Where a reading came from: one tuple for the database enum and the zod enum. */
export const READING_SOURCES = ["hand", "csv", "device"] as const;
export type ReadingSource = (typeof READING_SOURCES)[number];

/** Readings from before this date are refused (a typo in the year, most likely). */
export const EARLIEST_READING_MS = Date.UTC(2000, 0, 1);
/** Readings more than this far in the future are refused (a phone's clock can be a little off). */
export const FUTURE_SLACK_MS = 24 * 3600_000;
export const NOTE_MAX = 500;

/**
 * The smallest magnitude PostgreSQL's `real` keeps as a normal number is about 1.18e-38; any
 * reading this close to zero is noise, so it is refused rather than stored as something else.
 */
export const REAL_SMALLEST = 1e-30;

/** Text that PostgreSQL can store: no NUL character (text and jsonb both refuse it). */
export const noNul = (s: string) => !s.includes("\u0000");

/** A number that fits a `real` column: finite, and 0 or at least REAL_SMALLEST in size. */
export const storableReal = z
  .number({ error: "Must be a number" })
  .finite()
  .refine((v) => v === 0 || Math.abs(v) >= REAL_SMALLEST, "Too close to zero to store; give 0 instead");

const value = (key: ReadingValueKey) => {
  const { min, max, label, unit } = READING_LIMITS[key];
  return z
    .number({ error: `${label} must be a number` })
    .finite(`${label} must be a number`)
    .min(min, `${label} must be at least ${min} ${unit}`)
    .max(max, `${label} must be at most ${max} ${unit}`)
    .refine((v) => v === 0 || Math.abs(v) >= REAL_SMALLEST, `${label} is too close to zero to store; give 0 instead`)
    .nullable()
    .optional();
};

/**
 * An ISO 8601 time with its offset, between `earliest` and `latest` (ms since 1970, read when
 * checked). PostgreSQL refuses year 0000, so without a window such a time would fail the write.
 */
export function isoTimeWithin(opts: { earliest: number; latest: () => number; what: string }) {
  return z.iso
    .datetime({ offset: true, error: `Give ${opts.what} as an ISO 8601 time with its time zone` })
    .refine((s) => Date.parse(s) >= opts.earliest, `${opts.what[0]!.toUpperCase()}${opts.what.slice(1)} is too far in the past`)
    .refine((s) => Date.parse(s) <= opts.latest(), `${opts.what[0]!.toUpperCase()}${opts.what.slice(1)} is too far in the future`);
}

/** Times in queries (ranges, paging): 1970 to 2200. */
export const queryTime = (what: string) => isoTimeWithin({ earliest: 0, latest: () => Date.UTC(2200, 0, 1), what });

export const takenAtSchema = z.iso
  .datetime({ offset: true, error: "Give the time the reading was taken, with its time zone" })
  .refine((s) => Date.parse(s) >= EARLIEST_READING_MS, "The reading's time is before the year 2000")
  .refine((s) => Date.parse(s) <= Date.now() + FUTURE_SLACK_MS, "The reading's time is in the future");

export const noteSchema = z
  .string()
  .max(NOTE_MAX, `Keep the note under ${NOTE_MAX} characters`)
  .refine(noNul, "The note contains a NUL character");

export const readingValuesSchema = z.object({
  ...(Object.fromEntries(READING_VALUE_KEYS.map((k) => [k, value(k)])) as Record<ReadingValueKey, ReturnType<typeof value>>),
  note: noteSchema.optional(),
});

export const readingSourceSchema = z.enum(READING_SOURCES);

export const newReadingSchema = readingValuesSchema
  .extend({ id: z.uuid(), takenAt: takenAtSchema, source: readingSourceSchema.default("hand") })
  .refine(
    (r) => READING_VALUE_KEYS.some((k) => r[k] !== null && r[k] !== undefined),
    "A reading needs at least one value (voltage, current, SoC, temperature or solar)",
  );
export type NewReading = z.infer<typeof newReadingSchema>;

export const readingEditSchema = readingValuesSchema.extend({ takenAt: takenAtSchema.optional() });
export type ReadingEdit = z.infer<typeof readingEditSchema>;

/** A reading as it travels between server and phone. Times are ISO strings. */
export const wireReadingSchema = z.object({
  id: z.string(),
  rigId: z.string(),
  authorId: z.string().nullable(),
  takenAt: z.string(),
  ...(Object.fromEntries(READING_VALUE_KEYS.map((k) => [k, z.number().nullable()])) as Record<ReadingValueKey, z.ZodNullable<z.ZodNumber>>),
  note: z.string(),
  source: readingSourceSchema,
  updatedAt: z.string(),
  deletedAt: z.string().nullable(),
});
export type WireReading = z.infer<typeof wireReadingSchema>;

/** GET /api/rigs/:rigId/readings: a range as chart points (`series`) or a page of rows (`list`). */
export const readingsQuerySchema = z.object({
  from: queryTime("from").optional(),
  to: queryTime("to").optional(),
  /** "series": chart points (downsampled on the server for long ranges); "list": rows. */
  view: z.enum(["list", "series"]).default("list"),
  points: z.coerce.number().int().min(10).max(2000).default(600),
  limit: z.coerce.number().int().min(1).max(500).default(50),
  beforeAt: queryTime("beforeAt").optional(),
  beforeId: z.uuid().optional(),
});
