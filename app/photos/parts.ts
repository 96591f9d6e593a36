/**
 * The parts of a rig model a photo can be attached to, read from the model document without
 * knowing its version: every top-level list of named things with an `id` (banks, sources,
 * inverters, buses, switches, protections, circuits, loads, and what later versions add), but
 * not modes, which are plans rather than hardware. Pure: runs on the server and on the phone.
 */
export type ModelPart = { id: string; kind: string; name: string; location?: string };

const NOT_PARTS = new Set(["modes"]);

/** "buses" → "bus", "switches" → "switch", "loads" → "load". */
export function singularKind(listName: string): string {
  if (/(ss|sh|ch|x|s)es$/.test(listName) && !listName.endsWith("sses")) return listName.slice(0, -2);
  if (listName.endsWith("sses")) return listName.slice(0, -2);
  return listName.endsWith("s") ? listName.slice(0, -1) : listName;
}

export function modelParts(document: unknown): ModelPart[] {
  if (!document || typeof document !== "object") return [];
  const parts: ModelPart[] = [];
  const seen = new Set<string>();
  for (const [key, value] of Object.entries(document as Record<string, unknown>)) {
    if (NOT_PARTS.has(key) || !Array.isArray(value)) continue;
    for (const item of value) {
      if (!item || typeof item !== "object") continue;
      const { id, name, location } = item as { id?: unknown; name?: unknown; location?: unknown };
      if (typeof id !== "string" || !id || seen.has(id)) continue;
      seen.add(id);
      parts.push({
        id,
        kind: singularKind(key),
        name: typeof name === "string" && name ? name : id,
        ...(typeof location === "string" && location ? { location } : {}),
      });
    }
  }
  return parts;
}

export const partKindLabel: Record<string, string> = {
  bank: "Battery bank",
  source: "Charge source",
  inverter: "Inverter",
  bus: "Bus",
  switch: "Switch",
  protection: "Fuse or breaker",
  circuit: "Circuit",
  load: "Load",
  cable: "Cable run",
};
