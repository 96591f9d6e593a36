/**
 * The sync protocol, shared by the phone (app/offline) and the server (POST /api/sync).
 * Every change made on the phone has a client-generated id; the server answers per change
 * `applied`, `duplicate` (seen before: applied once) or `refused` with a reason, then the
 * rig's changes since the phone's cursor. See DEVELOPERS.md, "Offline and sync".
 */
import { z } from "zod";
import { stateWriteSchema } from "~/schemas/rig-state";

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

/** Readings from before this date are refused (a typo in the year, most likely). */
export const EARLIEST_READING_MS = Date.UTC(2000, 0, 1);
/** Readings more than this far in the future are refused (a phone's clock can be a little off). */
export const FUTURE_SLACK_MS = 24 * 3600_000;

const value = (key: ReadingValueKey) => {
  const { min, max, label, unit } = READING_LIMITS[key];
  return z
    .number({ error: `${label} must be a number` })
    .finite()
    .min(min, `${label} must be at least ${min} ${unit}`)
    .max(max, `${label} must be at most ${max} ${unit}`)
    .nullable()
    .optional();
};

const takenAt = z.iso
  .datetime({ offset: true, error: "Give the time the reading was taken, with its time zone" })
  .refine((s) => Date.parse(s) >= EARLIEST_READING_MS, "The reading's time is before the year 2000")
  .refine((s) => Date.parse(s) <= Date.now() + FUTURE_SLACK_MS, "The reading's time is in the future");

export const readingValuesSchema = z.object({
  bankVoltageV: value("bankVoltageV"),
  currentA: value("currentA"),
  socPct: value("socPct"),
  temperatureC: value("temperatureC"),
  solarWhToday: value("solarWhToday"),
  note: z.string().max(500, "Keep the note under 500 characters").optional(),
});

export const readingSourceSchema = z.enum(["hand", "csv", "device"]);

export const newReadingSchema = readingValuesSchema
  .extend({ id: z.uuid(), takenAt, source: readingSourceSchema.default("hand") })
  .refine(
    (r) => READING_VALUE_KEYS.some((k) => r[k] !== null && r[k] !== undefined),
    "A reading needs at least one value (voltage, current, SoC, temperature or solar)",
  );
export type NewReading = z.infer<typeof newReadingSchema>;

export const readingEditSchema = readingValuesSchema.extend({ takenAt: takenAt.optional() });
export type ReadingEdit = z.infer<typeof readingEditSchema>;

export const changeKinds = ["reading.add", "reading.edit", "reading.delete", "state.write", "model.save"] as const;
export type ChangeKind = (typeof changeKinds)[number];

export const payloadSchemas = {
  "reading.add": z.object({ reading: newReadingSchema }),
  "reading.edit": z.object({ readingId: z.uuid(), set: readingEditSchema }),
  "reading.delete": z.object({ readingId: z.uuid() }),
  /** A Now-screen write (switches, mode, SoC, place): the body of POST /api/rigs/:rigId/state. */
  "state.write": stateWriteSchema,
  /** Without a branch id the save is for the rig's as-built model. */
  "model.save": z.object({ branchId: z.uuid().optional(), baseRevision: z.number().int().min(1), document: z.unknown(), message: z.string().max(200).optional() }),
} satisfies Record<ChangeKind, z.ZodType>;

export type ChangePayload<K extends ChangeKind> = z.infer<(typeof payloadSchemas)[K]>;

/** The envelope; the payload is checked per change so one bad change cannot sink a batch. */
export const changeSchema = z.object({
  id: z.uuid(),
  kind: z.string().min(1).max(40),
  rigId: z.uuid(),
  clientTime: z.iso.datetime({ offset: true }),
  payload: z.unknown(),
});
export type Change = z.infer<typeof changeSchema>;

/** Changes per request: the phone sends its outbox in batches of at most this many. */
export const MAX_BATCH = 1000;
/** Pulled changes per answer; `more` says when to ask again. */
export const MAX_PULL = 1000;

export const syncRequestSchema = z.object({
  rigId: z.uuid(),
  /** The last cursor this phone has seen for the rig; null on the first sync. */
  cursor: z.number().int().min(0).nullable(),
  changes: z.array(changeSchema).max(MAX_BATCH, `Send at most ${MAX_BATCH} changes per request`),
  /** Readings taken before this time are not sent back (the phone keeps a window of days). */
  since: z.iso.datetime({ offset: true }).optional(),
});
export type SyncRequest = z.infer<typeof syncRequestSchema>;

export type RefusalReason =
  | "invalid"
  | "read_only"
  | "not_author"
  | "not_found"
  | "deleted"
  | "wrong_rig"
  | "unsupported"
  | "owners_only"
  | "lost_to_newer";

export type ChangeResult =
  | { id: string; status: "applied"; detail?: Record<string, unknown> }
  | { id: string; status: "duplicate" }
  | { id: string; status: "refused"; reason: RefusalReason; message: string; issues?: Array<{ path: (string | number)[]; message: string }> };

/** A reading as it travels between server and phone. Times are ISO strings. */
export type WireReading = {
  id: string;
  rigId: string;
  authorId: string | null;
  takenAt: string;
  bankVoltageV: number | null;
  currentA: number | null;
  socPct: number | null;
  temperatureC: number | null;
  solarWhToday: number | null;
  note: string;
  source: "hand" | "csv" | "device";
  updatedAt: string;
  deletedAt: string | null;
};

export type PulledChange =
  | { cursor: number; kind: "reading"; reading: WireReading }
  /** The shared state (switches, mode) moved: read it again. */
  | { cursor: number; kind: "state" }
  /** The model moved (a new as-built revision or a draft): read it again. */
  | { cursor: number; kind: "model" };

export type SyncResponse = {
  /** Who the server took the request from, and their role on the rig (the phone keeps these). */
  me?: { userId: string; role: "owner" | "crew" | "guest" };
  results: ChangeResult[];
  changes: PulledChange[];
  cursor: number;
  more: boolean;
  serverTime: string;
};
