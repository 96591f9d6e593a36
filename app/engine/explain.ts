/**
 * "How computed": every result a person sees carries the formula and the inputs used, so the
 * UI can show it when the number is tapped.
 */
export interface How {
  /** The formula in words and symbols, e.g. "t = H · (C / (I·H))^k". */
  formula: string;
  /** The inputs with units in their names, e.g. { capacityAh: 100, currentA: 5 }. */
  inputs: Record<string, number | string | boolean>;
  /** Where the formula or table comes from, and any caveat. */
  note?: string;
}

export function how(formula: string, inputs: How["inputs"], note?: string): How {
  return note === undefined ? { formula, inputs } : { formula, inputs, note };
}

/** Round for display in explanations (keeps explanations short and stable). */
export function r(value: number, digits = 3): number {
  if (!Number.isFinite(value)) return value;
  const f = 10 ** digits;
  return Math.round(value * f) / f;
}
