/**
 * Axis ticks that read well: "nice" steps (1, 2, 2.5 or 5 × 10ⁿ) covering [min, max], and labels with
 * just enough decimals that no two neighbouring labels read the same (a formatter that rounds every
 * tick to one decimal turned 0.02, 0.04, 0.06, 0.08 into "0.0 0.0 0.1 0.1"). Pure functions, shared
 * by the desk's plots and the agreement charts.
 */

/** Tick values from a multiple of the step at or below min to one at or above max, about `count` of them. */
export function niceTicks(min: number, max: number, count = 5): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (max < min) [min, max] = [max, min];
  if (max === min) {
    const pad = min === 0 ? 1 : Math.abs(min) * 0.1;
    min -= pad;
    max += pad;
  }
  const step = niceStep((max - min) / Math.max(1, count - 1));
  const first = Math.floor(min / step + 1e-9) * step;
  const ticks: number[] = [];
  for (let v = first; v <= max + step * 1e-9 || ticks.length < 2; v += step) {
    ticks.push(round(v, step));
    if (ticks.length > 50) break;
  }
  if (ticks[ticks.length - 1]! < max - step * 1e-9) ticks.push(round(ticks[ticks.length - 1]! + step, step));
  return ticks;
}

/** The smallest of 1, 2, 2.5, 5 × 10ⁿ not below `raw`. */
export function niceStep(raw: number): number {
  if (!(raw > 0)) return 1;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= raw * (1 - 1e-12)) return m * p;
  return 10 * p;
}

function round(v: number, step: number): number {
  const d = decimalsOf(step);
  return Number(v.toFixed(Math.min(20, d + 2)));
}

/** Decimals needed to write a step exactly (0.25 → 2, 0.1 → 1, 5 → 0). */
function decimalsOf(step: number): number {
  for (let d = 0; d <= 12; d++) if (Math.abs(Math.round(step * 10 ** d) - step * 10 ** d) < 1e-9 * 10 ** d) return d;
  return 12;
}

/**
 * A formatter for these ticks: fixed decimals enough to tell neighbours apart (from the smallest
 * gap), or scientific notation when the values are very large or very small.
 */
export function tickFormatter(ticks: number[]): (v: number) => string {
  const maxAbs = Math.max(0, ...ticks.map(Math.abs));
  let gap = Infinity;
  for (let i = 1; i < ticks.length; i++) gap = Math.min(gap, Math.abs(ticks[i]! - ticks[i - 1]!));
  if (maxAbs >= 1e5 || (maxAbs > 0 && maxAbs < 1e-3)) {
    const digits = Number.isFinite(gap) && gap > 0 ? Math.max(0, Math.min(6, Math.ceil(Math.log10(maxAbs / gap)))) : 1;
    return (v) => (v === 0 ? '0' : v.toExponential(digits));
  }
  const d = Number.isFinite(gap) && gap > 0 ? decimalsOf(niceStep(gap * (1 - 1e-9))) : 0;
  return (v) => {
    const s = v.toFixed(Math.min(d, 6));
    return /^-0(\.0+)?$/.test(s) ? s.slice(1) : s;
  };
}
