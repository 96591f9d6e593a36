/**
 * Owner edits to the modes inside the rig model (POST /api/rigs/:rigId/modes). Each edit saves a
 * new as-built revision; `expectedRevision` must be the head (409 otherwise).
 */
import { z } from "zod";
import type { Mode, RigModel } from "~/engine/model";

const id = z.string().min(1).max(100);
const hours = z.number().finite().min(0, "Hours per day are between 0 and 24").max(24, "Hours per day are between 0 and 24");

export const modeEditSchema = z.discriminatedUnion("op", [
  z.object({
    op: z.literal("create"),
    expectedRevision: z.number().int().min(1),
    name: z.string().trim().min(1, "Give the mode a name").max(60, "At most 60 characters"),
    /** Loads on in the new mode, with their hours per day. */
    loads: z.array(z.object({ loadId: id, hoursPerDay: hours })).max(500),
    inverterIdsOn: z.array(id).max(10).default([]),
  }),
  z.object({
    op: z.literal("hours"),
    expectedRevision: z.number().int().min(1),
    modeId: id,
    loads: z.array(z.object({ loadId: id, hoursPerDay: hours })).min(1).max(500),
  }),
]);
export type ModeEdit = z.infer<typeof modeEditSchema>;

function slug(name: string, taken: Set<string>): string {
  const base = name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 40) || "mode";
  let idOut = base;
  for (let n = 2; taken.has(idOut); n++) idOut = `${base}-${n}`;
  return idOut;
}

/** The model with the edit applied (validate the result with the engine's validateModel). */
export function applyModeEdit(model: RigModel, edit: ModeEdit): { model: RigModel; modeId: string; message: string } {
  if (edit.op === "create") {
    const taken = new Set<string>([
      ...model.modes.map((m) => m.id), ...model.loads.map((l) => l.id), ...model.buses.map((b) => b.id),
      ...model.banks.map((b) => b.id), ...model.sources.map((s) => s.id), ...model.inverters.map((i) => i.id),
      ...model.switches.map((s) => s.id), ...model.protections.map((p) => p.id), ...model.circuits.map((c) => c.id),
    ]);
    const mode: Mode = {
      id: slug(edit.name, taken),
      name: edit.name,
      loads: edit.loads.map((l) => ({ loadId: l.loadId, hoursPerDay: l.hoursPerDay })),
      inverterIdsOn: edit.inverterIdsOn,
      sources: [],
    };
    return { model: { ...model, modes: [...model.modes, mode] }, modeId: mode.id, message: `New mode "${edit.name}"` };
  }
  const modes = model.modes.map((m) => {
    if (m.id !== edit.modeId) return m;
    const byId = new Map(m.loads.map((l) => [l.loadId, l]));
    for (const l of edit.loads) {
      const was = byId.get(l.loadId);
      // Windows no longer fit new hours; they are dropped when the hours change.
      byId.set(l.loadId, was && was.hoursPerDay === l.hoursPerDay ? was : { loadId: l.loadId, hoursPerDay: l.hoursPerDay });
    }
    return { ...m, loads: [...byId.values()] };
  });
  const name = model.modes.find((m) => m.id === edit.modeId)?.name ?? edit.modeId;
  return { model: { ...model, modes }, modeId: edit.modeId, message: `Hours in mode "${name}"` };
}
