/**
 * The sync protocol, shared by the phone (app/offline) and the server (POST /api/sync).
 * Every change made on the phone has a client-generated id; the server answers per change
 * `applied`, `duplicate` (seen before: applied once) or `refused` with a reason, then the
 * rig's changes since the phone's cursor. The answer is a zod schema the phone parses.
 * See DEVELOPERS.md, "Offline and sync".
 */
import { z } from "zod";
import { roleSchema } from "~/auth/roles";
import { stateWriteSchema } from "~/schemas/rig-state";
import {
  EARLIEST_READING_MS,
  isoTimeWithin,
  newReadingSchema,
  noNul,
  readingEditSchema,
  wireReadingSchema,
} from "~/schemas/readings";

export const changeKinds = ["reading.add", "reading.edit", "reading.delete", "state.write", "model.save"] as const;
export type ChangeKind = (typeof changeKinds)[number];

/** True only for the kinds above: an own-property check, so "constructor" or "__proto__" are not kinds. */
export function isChangeKind(kind: string): kind is ChangeKind {
  return (changeKinds as readonly string[]).includes(kind);
}

export const payloadSchemas = {
  "reading.add": z.object({ reading: newReadingSchema }),
  "reading.edit": z.object({ readingId: z.uuid(), set: readingEditSchema }),
  "reading.delete": z.object({ readingId: z.uuid() }),
  /** A Now-screen write (switches, mode, SoC, place): the body of POST /api/rigs/:rigId/state. */
  "state.write": stateWriteSchema,
  /** Without a branch id the save is for the rig's as-built model. */
  "model.save": z.object({
    branchId: z.uuid().optional(),
    baseRevision: z.number().int().min(1).max(2_147_483_647),
    document: z.unknown(),
    message: z.string().max(200).refine(noNul, "The message contains a NUL character").optional(),
  }),
} satisfies Record<ChangeKind, z.ZodType>;

export type ChangePayload<K extends ChangeKind> = z.infer<(typeof payloadSchemas)[K]>;

/** When the phone says a change was made: from 2000 to a year ahead (clocks drift; year 0000 is refused). */
export const clientTimeSchema = isoTimeWithin({ earliest: EARLIEST_READING_MS, latest: () => Date.now() + 366 * 86_400_000, what: "the change's time" });

/** The envelope of one change; its payload is checked per change so one bad change cannot sink a batch. */
export const changeSchema = z.object({
  id: z.uuid(),
  kind: z.string().min(1).max(40),
  rigId: z.uuid(),
  clientTime: clientTimeSchema,
  payload: z.unknown(),
});
export type Change = z.infer<typeof changeSchema>;

/** Changes per request: the phone sends its outbox in batches of at most this many. */
export const MAX_BATCH = 1000;
/** Pulled changes per answer; `more` says when to ask again. */
export const MAX_PULL = 1000;
/** The most a sync request body may be, in bytes (1,000 changes fit well under it). */
export const MAX_SYNC_BYTES = 4 * 1024 * 1024;

/**
 * The request. `changes` is an array of anything: each element is checked on its own
 * (changeSchema, then the payload), so one malformed change is refused alone.
 */
export const syncRequestSchema = z.object({
  rigId: z.uuid(),
  /** The last cursor this phone has seen for the rig; null on the first sync. */
  cursor: z.number().int().min(0).max(Number.MAX_SAFE_INTEGER).nullable(),
  changes: z.array(z.unknown()).max(MAX_BATCH, `Send at most ${MAX_BATCH} changes per request`),
  /** Readings taken before this time are not sent back (the phone keeps a window of days). */
  since: isoTimeWithin({ earliest: 0, latest: () => Date.UTC(2200, 0, 1), what: "since" }).optional(),
});
export type SyncRequest = z.infer<typeof syncRequestSchema>;

export const refusalReasons = [
  "invalid",
  "read_only",
  "not_author",
  "not_found",
  "deleted",
  "wrong_rig",
  "unsupported",
  "owners_only",
  "lost_to_newer",
] as const;
export type RefusalReason = (typeof refusalReasons)[number];

const issueSchema = z.object({ path: z.array(z.union([z.string(), z.number()])), message: z.string() });

export const changeResultSchema = z.discriminatedUnion("status", [
  z.object({ id: z.string(), status: z.literal("applied"), detail: z.record(z.string(), z.unknown()).optional() }),
  z.object({ id: z.string(), status: z.literal("duplicate") }),
  z.object({ id: z.string(), status: z.literal("refused"), reason: z.enum(refusalReasons), message: z.string(), issues: z.array(issueSchema).optional() }),
]);
export type ChangeResult = z.infer<typeof changeResultSchema>;

export { wireReadingSchema, type WireReading } from "~/schemas/readings";

export const pulledChangeSchema = z.discriminatedUnion("kind", [
  z.object({ cursor: z.number(), kind: z.literal("reading"), reading: wireReadingSchema }),
  /** The shared state (switches, mode) moved: read it again. */
  z.object({ cursor: z.number(), kind: z.literal("state") }),
  /** The model moved (a new as-built revision or a draft): read it again. */
  z.object({ cursor: z.number(), kind: z.literal("model") }),
]);
export type PulledChange = z.infer<typeof pulledChangeSchema>;

/** What POST /api/sync answers; the phone parses it with this schema before using it. */
export const syncResponseSchema = z.object({
  /** Who the server took the request from, and their role on the rig (the phone keeps these). */
  me: z.object({ userId: z.string(), role: roleSchema }).optional(),
  results: z.array(changeResultSchema),
  changes: z.array(pulledChangeSchema),
  cursor: z.number().int().min(0),
  more: z.boolean(),
  serverTime: z.string(),
});
export type SyncResponse = z.infer<typeof syncResponseSchema>;
