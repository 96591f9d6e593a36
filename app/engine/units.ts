/** Unit conversions and small numeric helpers used across the engine. */

export const M_PER_FT = 0.3048;
export const FT_PER_M = 1 / M_PER_FT;
export const MM2_PER_KCMIL = 0.506707479; // 1 kcmil = 1000 circular mils = 0.5067 mm²
export const DEG = Math.PI / 180;

export const cToF = (c: number): number => c * 1.8 + 32;
export const fToC = (f: number): number => (f - 32) / 1.8;

/** Watts ↔ amps at a voltage. */
export const wattsToAmps = (w: number, v: number): number => (v > 0 ? w / v : 0);
export const ampsToWatts = (a: number, v: number): number => a * v;

export const clamp = (x: number, lo: number, hi: number): number => (x < lo ? lo : x > hi ? hi : x);

/**
 * Linear interpolation in a table of [x, y] pairs sorted by x ascending; clamps at the ends.
 */
export function interpolate(table: readonly (readonly [number, number])[], x: number): number {
  const first = table[0];
  const last = table[table.length - 1];
  if (!first || !last) return Number.NaN;
  if (x <= first[0]) return first[1];
  if (x >= last[0]) return last[1];
  for (let i = 1; i < table.length; i++) {
    const b = table[i]!;
    if (x <= b[0]) {
      const a = table[i - 1]!;
      return a[1] + ((b[1] - a[1]) * (x - a[0])) / (b[0] - a[0]);
    }
  }
  return last[1];
}

/** Inverse lookup in a table whose y is monotonic increasing in x. */
export function inverseInterpolate(table: readonly (readonly [number, number])[], y: number): number {
  return interpolate(table.map(([a, b]) => [b, a] as const), y);
}

/** Decimal hour of day (0–24) is inside a daily window; windows may wrap past midnight. */
export function inWindow(hour: number, startH: number, endH: number): boolean {
  if (startH === endH) return false;
  return startH < endH ? hour >= startH && hour < endH : hour >= startH || hour < endH;
}

/** Length of a daily window in hours. */
export function windowHours(startH: number, endH: number): number {
  return startH <= endH ? endH - startH : 24 - startH + endH;
}
