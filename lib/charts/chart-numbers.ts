/**
 * Pure helpers shared by the charts: which plotted points go into a chart's numbers table, and axes
 * with units and round tick values. No React, no Plotly (unit-tested in chart-numbers.test.ts).
 */

/**
 * Indices of the points of an increasing grid nearest each multiple of `step` (ends included), so a
 * curve drawn on hundreds of points gets a readable table (for example every 0.05 of a rate).
 */
export function sampleIndices(xs: readonly number[], step: number): number[] {
  if (xs.length === 0) return [];
  if (!(step > 0)) throw new Error("step must be positive");
  const first = xs[0];
  const last = xs[xs.length - 1];
  const picked = new Set<number>([0, xs.length - 1]);
  let j = 0;
  for (let k = Math.ceil(first / step - 1e-9); k * step <= last + 1e-9; k++) {
    const target = k * step;
    while (j + 1 < xs.length && Math.abs(xs[j + 1] - target) <= Math.abs(xs[j] - target)) j++;
    picked.add(j);
  }
  return [...picked].sort((a, b) => a - b);
}

/** A round tick spacing (1, 2 or 5 times a power of ten, at least 1) giving about `ticks` intervals up to max. */
export function roundCountStep(max: number, ticks = 6): number {
  if (!(max > 0)) return 1;
  const raw = max / ticks;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  return Math.max(1, step);
}

type Axis = Record<string, unknown>;

/** A count axis (patients, responders): from 0, whole-number round ticks, the unit in the title. */
export function countAxis(title: string, max: number, extra: Axis = {}): Axis {
  return { title: { text: title }, rangemode: "tozero", tick0: 0, dtick: roundCountStep(max), tickformat: "d", automargin: true, ...extra };
}

/** A probability or rate axis from lo to hi with ticks every `dtick` (0.1 or 0.2 read best). */
export function probabilityAxis(title: string, extra: Axis = {}, lo = 0, hi = 1, dtick = 0.1): Axis {
  return { title: { text: title }, range: [lo, hi], tick0: 0, dtick, automargin: true, ...extra };
}

/** A density axis: from 0, Plotly's own round ticks (1, 2, 5 multiples), the unit in the title. */
export function densityAxis(title = "Density (per unit of rate)", extra: Axis = {}): Axis {
  return { title: { text: title }, rangemode: "tozero", automargin: true, ...extra };
}

/** Fixed decimals for a table cell; null (no value, e.g. a boundary that never stops) stays null. */
export function cell(v: number | null | undefined, decimals = 3): string | null {
  return v === null || v === undefined || !Number.isFinite(v) ? null : v.toFixed(decimals);
}
