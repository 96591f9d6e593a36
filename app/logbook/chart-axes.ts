/**
 * Axis ranges and tick labels for the logbook's chart (drawn with uPlot). One reading must not
 * stretch the time axis over years, voltages must not start at 0 V, and no two ticks may read
 * the same.
 */

/** Time range in seconds: a lone reading gets an hour either side. */
export function timeRange(min: number | null, max: number | null): [number, number] {
  if (min === null || max === null || !Number.isFinite(min) || !Number.isFinite(max)) {
    const now = Date.now() / 1000;
    return [now - 3600, now + 3600];
  }
  if (max - min < 600) return [min - 3600, max + 3600];
  return [min, max];
}

/** Voltage range: the data with a tenth of its span either side, never narrower than 0.4 V. */
export function voltageRange(min: number | null, max: number | null): [number, number] {
  if (min === null || max === null || !Number.isFinite(min) || !Number.isFinite(max)) return [12, 14];
  const span = Math.max(max - min, 0.4);
  const mid = (min + max) / 2;
  const lo = mid - span / 2 - span * 0.1;
  const hi = mid + span / 2 + span * 0.1;
  return [Math.floor(lo * 100) / 100, Math.ceil(hi * 100) / 100];
}

/** Enough decimals that ticks `step` apart all read differently (0.05 V → 2 decimals). */
export function decimalsFor(step: number): number {
  if (!Number.isFinite(step) || step <= 0) return 1;
  let d = 0;
  while (d < 6 && Math.abs(Math.round(step * 10 ** d) - step * 10 ** d) > 1e-6 * 10 ** d) d++;
  return d;
}

/** Labels for the ticks uPlot placed: each with the decimals its spacing needs. */
export function tickLabels(ticks: number[]): string[] {
  const steps = ticks.slice(1).map((t, i) => t - ticks[i]!).filter((x) => x > 0);
  const step = steps.length ? Math.min(...steps) : 1;
  const d = Math.max(1, decimalsFor(Number(step.toPrecision(6))));
  return ticks.map((t) => t.toFixed(d));
}
