/** One response: HTTP status (0 = no answer) and its time in milliseconds. */
export type Sample = { status: number; ms: number };

/** Nearest-rank percentile (p in 0–100) of sorted values; NaN for none. */
export function percentile(sorted: number[], p: number): number {
  if (!sorted.length) return NaN;
  const rank = Math.ceil((p / 100) * sorted.length);
  return sorted[Math.min(sorted.length, Math.max(1, rank)) - 1];
}

/** Count, achieved rate over `seconds`, p50/p95/p99 of the answered requests, and errors (no answer or status ≥ 400). */
export function summarise(samples: Sample[], seconds: number) {
  const ms = samples
    .filter((s) => s.status > 0)
    .map((s) => s.ms)
    .sort((a, b) => a - b);
  return {
    count: samples.length,
    rate: samples.length / seconds,
    p50: percentile(ms, 50),
    p95: percentile(ms, 95),
    p99: percentile(ms, 99),
    errors: samples.filter((s) => s.status === 0 || s.status >= 400).length,
  };
}
