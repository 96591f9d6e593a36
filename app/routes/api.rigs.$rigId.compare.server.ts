/**
 * The comparison route's logic (app/routes/api.rigs.$rigId.compare.ts): the request's shape, and
 * each side's model (the as-built one or a checked draft) with its switch positions checked.
 */
import { z } from "zod";
import type { Issue } from "~/engine/issues";
import { validateModel, type RigModel } from "~/engine/model";

const positions = z.record(z.string().min(1).max(100), z.string().min(1).max(40));
const sideSchema = z.object({
  /** A draft model document (from the editor); absent = the rig as built. */
  model: z.unknown().optional(),
  /** Switch positions for this side (others resolve as the engine does). */
  positions: positions.optional(),
  label: z.string().min(1).max(60).optional(),
});
export const compareRequestSchema = z.object({
  a: sideSchema.default({}),
  b: sideSchema,
  /** The instant to project from (default: the server's now). */
  dateTime: z.iso.datetime({ offset: true }).optional(),
  banks: z.array(z.object({ bankId: z.string().min(1).max(100), socPct: z.number().finite().min(0).max(100) })).max(8).optional(),
  horizonH: z.number().int().min(6).max(168).optional(),
});

type CompareRequest = z.infer<typeof compareRequestSchema>;
type Side = { model: RigModel; switchPositions?: Record<string, string>; label: string };
type SideError = { code: "invalid_model" | "invalid_position"; message: string; issues: Issue[] };

/** The two sides to compare, or the first side's problem (paths under `a.` / `b.`). */
export function compareSides(asBuilt: RigModel, request: CompareRequest): { ok: true; sides: [Side, Side] } | ({ ok: false } & SideError) {
  const fail = (code: SideError["code"], message: string, issues: Issue[]) => ({ ok: false as const, code, message, issues });
  const sides: Side[] = [];
  for (const [key, s] of [["a", request.a], ["b", request.b]] as const) {
    let model = asBuilt;
    if (s.model !== undefined) {
      const v = validateModel(s.model);
      if (!v.ok) return fail("invalid_model", `Side ${key}: the draft is not a valid rig model.`, v.issues.map((i) => ({ ...i, path: [key, "model", ...i.path] })));
      model = v.model;
    }
    const bad = Object.entries(s.positions ?? {}).find(([id, pos]) => !model.switches.some((sw) => sw.id === id && sw.positions.includes(pos)));
    if (bad) return fail("invalid_position", `Side ${key}: no switch "${bad[0]}" with a position "${bad[1]}".`, [{ path: [key, "positions", bad[0]], message: "Unknown switch or position" }]);
    sides.push({ model, ...(s.positions ? { switchPositions: s.positions } : {}), label: s.label ?? (s.model !== undefined ? "draft" : "as built") });
  }
  return { ok: true, sides: [sides[0]!, sides[1]!] };
}
