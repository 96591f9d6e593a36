/**
 * The shared state of a rig "now" (switches, mode, SoC entry, place, weather) as the API sends
 * it and as the phone keeps it. One schema for the API routes, the Now screen and the offline
 * store. The engine's own input (`app/engine/state.ts`) is derived from it by
 * `toEngineState` in `app/components/now/now-model.ts`. Switch positions not recorded here are
 * resolved by the engine (`resolvePositions` in app/engine/solution.ts): normal position, then
 * following the loads on, else off; a changeover with neither has no position (a finding).
 */
import { z } from "zod";

const id = z.string().min(1).max(100);
/** A time with its offset, 2000 to a year ahead (PostgreSQL refuses year 0000; issue 9). */
const isoTime = z.iso
  .datetime({ offset: true })
  .refine((s) => Date.parse(s) >= Date.UTC(2000, 0, 1), "The time is before the year 2000")
  .refine((s) => Date.parse(s) <= Date.now() + 366 * 86_400_000, "The time is too far in the future");

export const latDeg = z.number().finite().min(-90, "Latitude is between −90 and 90°").max(90, "Latitude is between −90 and 90°");
export const lonDeg = z.number().finite().min(-180, "Longitude is between −180 and 180°").max(180, "Longitude is between −180 and 180°");

export const placeSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("home") }),
  /** From the browser's geolocation (with the person's permission). */
  z.object({ kind: z.literal("device"), latDeg, lonDeg, accuracyM: z.number().finite().min(0).max(1e6).optional() }),
  /** Typed latitude and longitude. */
  z.object({ kind: z.literal("typed"), latDeg, lonDeg }),
]);
export type Place = z.infer<typeof placeSchema>;

export const weatherSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.enum(["clear", "hazy", "overcast"]) }),
  z.object({ kind: z.literal("percent"), pct: z.number().finite().min(0, "Between 0 and 100 %").max(100, "Between 0 and 100 %") }),
]);
export type Weather = z.infer<typeof weatherSchema>;

/** Share of clear-sky sun for each weather choice (the engine's documented scale: 1, 0.5, 0.2). */
export const WEATHER_FACTORS = { clear: 1, hazy: 0.5, overcast: 0.2 } as const;

export function weatherFactor(w: Weather): number {
  return w.kind === "percent" ? w.pct / 100 : WEATHER_FACTORS[w.kind];
}

/** Where a SoC entry came from (also the database enum `soc_source`). */
export const socSources = ["entered", "resting_voltage", "logbook"] as const;
export const socSourceSchema = z.enum(socSources);
export type SocSource = z.infer<typeof socSourceSchema>;

export const socEntrySchema = z.object({
  /** SoC of the house bank, % (for a resting voltage: the engine's estimate, kept for the record). */
  socPct: z.number().finite().min(0, "SoC is between 0 and 100 %").max(100, "SoC is between 0 and 100 %"),
  source: socSourceSchema,
  /** The resting voltage read, when the SoC came from one. */
  restingV: z.number().finite().positive("A voltage above 0 V").max(100, "At most 100 V").optional(),
  /** When the value was read (not when it was typed in). */
  takenAt: isoTime,
});
export type SocEntry = z.infer<typeof socEntrySchema>;

export const fieldTimeSchema = z.object({ at: isoTime, by: z.string().nullable(), byName: z.string().optional() });

/** What GET /api/rigs/:rigId/state answers (and what the offline store keeps). */
export const rigStateSchema = z.object({
  rigId: z.string(),
  version: z.number().int().min(0),
  modeId: id.nullable(),
  /** loadId → on; loads not listed follow the mode. */
  switches: z.record(z.string(), z.boolean()),
  /** switchId → position, for switches someone has set here; others are taken as needed. */
  positions: z.record(z.string(), z.string()),
  soc: socEntrySchema.nullable(),
  /** SoC entries of the other banks (bankId → entry); `soc` is the primary bank's. */
  bankSocs: z.record(z.string(), socEntrySchema).optional(),
  place: placeSchema,
  weather: weatherSchema,
  /** Per field ("load:<id>", "switch:<id>", "mode", "soc", "place"): last change, server time. */
  fieldTimes: z.record(z.string(), fieldTimeSchema),
  updatedAt: isoTime.nullable(),
  /**
   * What was switched on from each change on, between the oldest SoC entry and when the server
   * answered (app/repos/switch-history.server.ts), oldest first: the engine carries an old SoC
   * forward through it. Absent when nothing changed in between; the phone keeps the last one.
   */
  history: z
    .array(z.object({ at: isoTime, modeId: id.optional(), loadsOn: z.array(id).max(500).optional(), switchPositions: z.record(z.string(), z.string()).optional() }))
    .max(200)
    .optional(),
});
export type RigState = z.infer<typeof rigStateSchema>;

/** The newest logbook reading with a SoC or a bank voltage. */
export const latestReadingSchema = z.object({
  id: z.string(),
  takenAt: isoTime,
  socPct: z.number().nullable(),
  bankVoltageV: z.number().nullable(),
  currentA: z.number().nullable(),
});
export type LatestReading = z.infer<typeof latestReadingSchema>;

/** One change a person makes on the Now screen. */
export const stateChangeSchema = z.discriminatedUnion("kind", [
  z.object({
    kind: z.literal("switch"),
    loads: z.array(z.object({ loadId: id, on: z.boolean() })).min(1).max(500),
    /** Physical switches set at the same time (the "switch them all" offer). */
    positions: z.array(z.object({ switchId: id, position: z.string().min(1).max(40) })).max(50).optional(),
  }),
  z.object({ kind: z.literal("mode"), modeId: id }),
  /** Without bankId: the primary bank's SoC. */
  z.object({ kind: z.literal("soc"), soc: socEntrySchema, bankId: id.optional() }),
  z.object({ kind: z.literal("place"), place: placeSchema.optional(), weather: weatherSchema.optional() }),
]);
export type StateChange = z.infer<typeof stateChangeSchema>;

/** Body of POST /api/rigs/:rigId/state. */
export const stateWriteSchema = z.object({
  /** The version the writer last saw; a lower number than the server's is not an error by itself. */
  baseVersion: z.number().int().min(0),
  /** When the person made the change, on their device (kept in the history). */
  clientTime: isoTime.optional(),
  change: stateChangeSchema,
});
export type StateWrite = z.infer<typeof stateWriteSchema>;

/** A field this write did not change because someone else's later write (by server time) had. */
export const supersededSchema = z.object({ field: z.string(), by: z.string().nullable(), byName: z.string().optional(), at: isoTime });
export type Superseded = z.infer<typeof supersededSchema>;

export const stateWriteResultSchema = z.object({
  state: rigStateSchema,
  /** True when some or all of the write lost to a later write; `lostFields` says which. */
  superseded: z.boolean(),
  lostFields: z.array(supersededSchema),
  /** Changes by others since `baseVersion` that this write replaced (the writer had not seen them). */
  replaced: z.array(supersededSchema),
});
export type StateWriteResult = z.infer<typeof stateWriteResultSchema>;

export function emptyRigState(rigId: string): RigState {
  return {
    rigId,
    version: 0,
    modeId: null,
    switches: {},
    positions: {},
    soc: null,
    place: { kind: "home" },
    weather: { kind: "clear" },
    fieldTimes: {},
    updatedAt: null,
  };
}

/** Applies a change to a state locally (optimistic update; also the offline store's reducer). */
export function applyChange(state: RigState, change: StateChange): RigState {
  switch (change.kind) {
    case "switch": {
      const switches = { ...state.switches };
      for (const l of change.loads) switches[l.loadId] = l.on;
      const positions = { ...state.positions };
      for (const p of change.positions ?? []) positions[p.switchId] = p.position;
      return { ...state, switches, positions };
    }
    case "mode":
      // A mode sets every switch at once: per-load overrides are cleared.
      return { ...state, modeId: change.modeId, switches: {} };
    case "soc":
      if (change.bankId !== undefined) return { ...state, bankSocs: { ...(state.bankSocs ?? {}), [change.bankId]: change.soc } };
      return { ...state, soc: change.soc };
    case "place":
      return { ...state, ...(change.place ? { place: change.place } : {}), ...(change.weather ? { weather: change.weather } : {}) };
  }
}

/** Checks a change's ids against the rig model; answers issues (empty when it fits). */
export function checkChangeAgainstModel(
  model: { loads: { id: string }[]; modes: { id: string }[]; switches: { id: string; positions: string[] }[]; banks?: { id: string }[] },
  change: StateChange,
): Array<{ path: (string | number)[]; message: string }> {
  const issues: Array<{ path: (string | number)[]; message: string }> = [];
  if (change.kind === "switch") {
    const loads = new Set(model.loads.map((l) => l.id));
    change.loads.forEach((l, i) => {
      if (!loads.has(l.loadId)) issues.push({ path: ["change", "loads", i, "loadId"], message: `This rig has no load "${l.loadId}".` });
    });
    const switches = new Map(model.switches.map((s) => [s.id, s]));
    (change.positions ?? []).forEach((p, i) => {
      const sw = switches.get(p.switchId);
      if (!sw) issues.push({ path: ["change", "positions", i, "switchId"], message: `This rig has no switch "${p.switchId}".` });
      else if (!sw.positions.includes(p.position)) {
        issues.push({ path: ["change", "positions", i, "position"], message: `Switch "${p.switchId}" has no position "${p.position}".` });
      }
    });
  }
  if (change.kind === "mode" && !model.modes.some((m) => m.id === change.modeId)) {
    issues.push({ path: ["change", "modeId"], message: `This rig has no mode "${change.modeId}".` });
  }
  if (change.kind === "soc" && change.bankId !== undefined && model.banks && !model.banks.some((b) => b.id === change.bankId)) {
    issues.push({ path: ["change", "bankId"], message: `This rig has no bank "${change.bankId}".` });
  }
  if (change.kind === "soc") {
    if (change.soc.source === "resting_voltage" && change.soc.restingV === undefined) {
      issues.push({ path: ["change", "soc", "restingV"], message: "Give the resting voltage the SoC was estimated from." });
    }
    const taken = Date.parse(change.soc.takenAt);
    if (taken > Date.now() + 5 * 60_000) issues.push({ path: ["change", "soc", "takenAt"], message: "The reading cannot be taken in the future." });
  }
  if (change.kind === "place" && !change.place && !change.weather) {
    issues.push({ path: ["change"], message: "Give a place, a weather choice or both." });
  }
  return issues;
}

/** The SoC entry of a bank: `soc` for the primary bank (unless a bank entry is newer), else its own entry. */
export function socEntryFor(state: RigState, bankId: string, primaryBankId: string): SocEntry | null {
  const own = state.bankSocs?.[bankId] ?? null;
  if (bankId !== primaryBankId) return own;
  if (own && state.soc && Date.parse(own.takenAt) > Date.parse(state.soc.takenAt)) return own;
  return state.soc ?? own;
}

/** Loads on: the mode's loads (hours > 0) with per-load overrides (the engine's planLoads rule). */
export function effectiveLoadsOn(
  model: { modes: { id: string; loads: { loadId: string; hoursPerDay: number }[] }[] },
  modeId: string | null,
  switches: Record<string, boolean>,
): Set<string> {
  const mode = model.modes.find((m) => m.id === modeId) ?? model.modes[0];
  const on = new Set((mode?.loads ?? []).filter((l) => l.hoursPerDay > 0).map((l) => l.loadId));
  for (const [loadId, isOn] of Object.entries(switches)) {
    if (isOn) on.add(loadId);
    else on.delete(loadId);
  }
  return on;
}
