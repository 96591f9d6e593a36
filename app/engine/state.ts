/**
 * The current state a projection starts from: SoC or resting voltage per bank, loads on,
 * mode, location, date-time and a weather factor.
 */
import { z } from "zod";

const id = z.string().min(1).max(100);

export const bankStateSchema = z.object({
  bankId: id,
  /** State of charge from a monitor; preferred over a resting voltage. */
  socPct: z.number().finite().min(0).max(100).optional(),
  /** Resting (open-circuit) bank voltage, read after the bank has rested. */
  restingV: z.number().finite().positive().max(100).optional(),
  /** When the SoC or voltage was read; the projection carries it forward to `dateTime`
   * (./carry-forward). Absent: it is taken as read at `dateTime`. */
  takenAt: z.iso.datetime({ offset: true }).optional(),
  /** Battery temperature, for the lead-acid capacity correction. */
  temperatureC: z.number().finite().min(-40).max(70).optional(),
});
export type BankState = z.infer<typeof bankStateSchema>;

export const currentStateSchema = z.object({
  /** ISO 8601 instant with offset or Z, e.g. "2026-10-15T19:30:00-06:00". */
  dateTime: z.iso.datetime({ offset: true }),
  modeId: id,
  banks: z.array(bankStateSchema).max(8),
  /** Loads switched on now; absent = the mode's loads. */
  loadsOn: z.array(id).max(500).optional(),
  inverterIdsOn: z.array(id).max(10).optional(),
  /** Positions of switches that choose between feeds (e.g. a changeover). */
  switchPositions: z.record(z.string(), z.string()).optional(),
  /** What changed between an old SoC reading and now (switch history), oldest first; each
   * entry holds from `at` on. Used to carry an old reading forward (./carry-forward). */
  history: z.array(z.object({
    at: z.iso.datetime({ offset: true }),
    modeId: id.optional(),
    loadsOn: z.array(id).max(500).optional(),
    switchPositions: z.record(z.string(), z.string()).optional(),
  })).max(200).optional(),
  /** Where the rig is now; absent = its home location. */
  location: z
    .object({
      latDeg: z.number().finite().min(-90).max(90),
      lonDeg: z.number().finite().min(-180).max(180),
      elevationM: z.number().finite().min(-500).max(9000).optional(),
    })
    .optional(),
  /** Share of clear-sky sun expected: 1 clear, 0.5 hazy or part cloud, 0.2 overcast. */
  weatherFactor: z.number().finite().min(0).max(1).optional(),
  /** Outside air temperature for the panels' temperature derating. Default 20 °C. */
  ambientC: z.number().finite().min(-40).max(60).optional(),
});
export type CurrentState = z.infer<typeof currentStateSchema>;
