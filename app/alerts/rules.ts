/**
 * Alert rules: what can warn a household, each rule's settings and defaults, and a person's
 * "Warn me" preferences. Pure (shared by the server and the rig's Alerts page).
 */
import { z } from "zod";

export const RULE_KINDS = ["runway_low", "soc_low", "voltage_low", "no_reading", "charging_stopped", "falls_short"] as const;
export type RuleKind = (typeof RULE_KINDS)[number];

/** Rules that depend on the clock as well as on arriving readings: the schedule re-checks them. */
export const TIME_BASED_RULES: readonly RuleKind[] = ["runway_low", "no_reading", "charging_stopped", "falls_short"];

/** The cutoff warning: quiet hours never hold it back. */
export const CUTOFF_RULE: RuleKind = "runway_low";

export const RULE_NAMES: Record<RuleKind, string> = {
  runway_low: "Runway getting short",
  soc_low: "State of charge below the floor",
  voltage_low: "Bank voltage low",
  no_reading: "No reading from the rig",
  charging_stopped: "Charging stopped in daylight",
  falls_short: "Won't make the next charge",
};

const hours = (max: number) => z.coerce.number().finite().min(0.25, "At least a quarter of an hour").max(max, `At most ${max} h`);

export const rigRulesSchema = z.object({
  runway_low: z.object({ enabled: z.boolean(), belowH: hours(72) }),
  /** Null: the bank's own usable floor from the model. */
  soc_low: z.object({ enabled: z.boolean(), floorPct: z.coerce.number().finite().min(1).max(95).nullable() }),
  /** Null: the default for the bank's nominal voltage (see `defaultVoltageThreshold`). */
  voltage_low: z.object({ enabled: z.boolean(), belowV: z.coerce.number().finite().min(1).max(70).nullable() }),
  /** Only while the chosen mode is one of `parkedModeIds` (empty: any mode counts as parked). */
  no_reading: z.object({ enabled: z.boolean(), afterH: hours(168), parkedModeIds: z.array(z.string()).max(50) }),
  charging_stopped: z.object({ enabled: z.boolean() }),
  falls_short: z.object({ enabled: z.boolean() }),
});
export type RigRules = z.infer<typeof rigRulesSchema>;

export const DEFAULT_RULES: RigRules = {
  runway_low: { enabled: true, belowH: 3 },
  soc_low: { enabled: true, floorPct: null },
  voltage_low: { enabled: true, belowV: null },
  no_reading: { enabled: false, afterH: 6, parkedModeIds: [] },
  charging_stopped: { enabled: true },
  falls_short: { enabled: true },
};

/** A stored rules document over the defaults (a rule missing or unreadable keeps its default). */
export function rulesWithDefaults(stored: unknown): RigRules {
  const out: Record<string, unknown> = { ...DEFAULT_RULES };
  if (stored && typeof stored === "object") {
    for (const kind of RULE_KINDS) {
      const parsed = rigRulesSchema.shape[kind].safeParse((stored as Record<string, unknown>)[kind]);
      if (parsed.success) out[kind] = parsed.data;
    }
  }
  return out as RigRules;
}

/**
 * Default low-voltage alert threshold: 12.0 V per 12 V of nominal bank voltage (trade practice,
 * no published source: a resting 12 V lead-acid bank at 12.0 V is roughly half discharged, and a
 * 12.8 V LiFePO4 bank at 12.0 V has little left). Values from memory; owners should set their own.
 */
export function defaultVoltageThreshold(nominalV: number): number {
  // The bank's system class (12, 24 or 48 V): a 12.8 V LiFePO4 bank is a 12 V system.
  const systemV = Math.max(12, Math.round(nominalV / 12) * 12);
  return Math.round((systemV / 12) * 12.0 * 10) / 10;
}

const minuteOfDay = z.coerce.number().int().min(0).max(1439);

export const preferencesSchema = z
  .object({
    rules: z.array(z.enum(RULE_KINDS)).max(RULE_KINDS.length),
    quietStartMin: minuteOfDay.nullable(),
    quietEndMin: minuteOfDay.nullable(),
    timeZone: z.string().min(1).max(64).refine((tz) => {
      try {
        new Intl.DateTimeFormat("en", { timeZone: tz });
        return true;
      } catch {
        return false;
      }
    }, "Unknown time zone"),
    push: z.boolean(),
    email: z.boolean(),
  })
  .refine((p) => (p.quietStartMin === null) === (p.quietEndMin === null), { message: "Give both ends of the quiet hours, or neither", path: ["quietEndMin"] });
export type Preferences = z.infer<typeof preferencesSchema>;

export const DEFAULT_PREFERENCES: Preferences = {
  rules: [...RULE_KINDS],
  quietStartMin: null,
  quietEndMin: null,
  timeZone: "UTC",
  push: true,
  email: false,
};

/** Minutes from local midnight of an instant in a time zone. */
export function localMinuteOfDay(ms: number, timeZone: string): number {
  const parts = new Intl.DateTimeFormat("en-GB", { timeZone, hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).formatToParts(new Date(ms));
  const h = Number(parts.find((p) => p.type === "hour")?.value ?? 0);
  const m = Number(parts.find((p) => p.type === "minute")?.value ?? 0);
  return h * 60 + m;
}

/** Inside quiet hours [start, end) local time; a window may wrap midnight (22:00–07:00). */
export function inQuietHours(prefs: Pick<Preferences, "quietStartMin" | "quietEndMin" | "timeZone">, ms: number): boolean {
  const { quietStartMin: s, quietEndMin: e } = prefs;
  if (s === null || e === null || s === e) return false;
  const m = localMinuteOfDay(ms, prefs.timeZone);
  return s < e ? m >= s && m < e : m >= s || m < e;
}

/** Whether this rule may reach this person now (quiet hours never hold back the cutoff warning). */
export function mayNotify(prefs: Preferences, rule: RuleKind, ms: number): boolean {
  if (!prefs.rules.includes(rule)) return false;
  if (rule === CUTOFF_RULE) return true;
  return !inQuietHours(prefs, ms);
}
