import { AgreementError } from './errors';
import { createRng } from '@/lib/random';
import type { StatResult } from './result';
import type { ItemSelection, RatingsTable } from './table';

export type BootstrapOptions = {
  /** Number of resamples (default 1000). */
  resamples?: number;
  /** PRNG seed (default 1). */
  seed?: number;
  /** Coverage of the interval (default 0.95). */
  level?: number;
};

/**
 * A percentile bootstrap interval. `used` resamples gave a defined value; `skipped` were
 * degenerate (e.g. a single category in the resample, κ undefined) and left out.
 */
export type ConfidenceInterval = {
  lower: number | null;
  upper: number | null;
  level: number;
  resamples: number;
  used: number;
  skipped: number;
  seed: number;
  reason?: string;
};

/** Evaluates a statistic on the items idx[0..len); returns null when it is undefined there. */
export type ResampleEvaluator = (idx: Int32Array, len: number) => number | null;

export const DEFAULT_RESAMPLES = 1000;
export const DEFAULT_SEED = 1;

function options(opts: BootstrapOptions | undefined) {
  const resamples = opts?.resamples ?? DEFAULT_RESAMPLES;
  const seed = opts?.seed ?? DEFAULT_SEED;
  const level = opts?.level ?? 0.95;
  if (!Number.isInteger(resamples) || resamples < 1)
    throw new AgreementError('bad_input', `bootstrap resamples must be a positive integer, got ${resamples}`);
  if (!Number.isFinite(seed)) throw new AgreementError('bad_input', `bootstrap seed must be a number, got ${seed}`);
  if (!(level > 0 && level < 1)) throw new AgreementError('bad_input', `interval level must be in (0, 1), got ${level}`);
  return { resamples, seed, level };
}

/** Quantile of sorted values x[0..n), linear interpolation between order statistics (Hyndman & Fan 1996, type 7). */
export function quantileSorted(x: Float64Array, n: number, p: number): number {
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, n - 1);
  return x[lo] + (h - lo) * (x[hi] - x[lo]);
}

function interval(values: Float64Array, used: number, resamples: number, seed: number, level: number): ConfidenceInterval {
  const skipped = resamples - used;
  if (used === 0) {
    return { lower: null, upper: null, level, resamples, used, skipped, seed, reason: 'the statistic was undefined in every resample' };
  }
  const sorted = values.subarray(0, used).sort();
  const tail = (1 - level) / 2;
  return {
    lower: quantileSorted(sorted, used, tail),
    upper: quantileSorted(sorted, used, 1 - tail),
    level,
    resamples,
    used,
    skipped,
    seed,
  };
}

/**
 * Seeded percentile bootstrap over items (Efron & Tibshirani 1993, ch. 13) of several statistics at
 * once: each resample draws n item indices with replacement, `evaluate(idx, n, out)` writes one
 * value per statistic into `out` (NaN = undefined in this resample, which is then skipped for that
 * statistic), and each interval is the (1 − level)/2 and (1 + level)/2 quantiles of its defined
 * values. Buffers are allocated once; `evaluate` must not keep `idx` or `out`.
 */
export function bootstrapVector(
  nItems: number,
  nStats: number,
  evaluate: (idx: Int32Array, len: number, out: Float64Array) => void,
  opts?: BootstrapOptions,
): ConfidenceInterval[] {
  const { resamples, seed, level } = options(opts);
  if (nItems < 1) {
    return Array.from({ length: nStats }, () => ({
      lower: null,
      upper: null,
      level,
      resamples,
      used: 0,
      skipped: resamples,
      seed,
      reason: 'no items',
    }));
  }
  const rng = createRng(seed, 'golden-xor'); // the scheme released intervals were computed with
  const idx = new Int32Array(nItems);
  const row = new Float64Array(nStats);
  const values = Array.from({ length: nStats }, () => new Float64Array(resamples));
  const used = new Int32Array(nStats);
  for (let b = 0; b < resamples; b++) {
    for (let s = 0; s < nItems; s++) idx[s] = rng.int(nItems);
    row.fill(NaN);
    evaluate(idx, nItems, row);
    for (let f = 0; f < nStats; f++) if (Number.isFinite(row[f])) values[f][used[f]++] = row[f];
  }
  return values.map((v, f) => interval(v, used[f], resamples, seed, level));
}

/** Like bootstrapVector, with one named evaluator per statistic (all see the same resamples). */
export function bootstrapMany<K extends string>(
  nItems: number,
  evaluators: Record<K, ResampleEvaluator>,
  opts?: BootstrapOptions,
): Record<K, ConfidenceInterval> {
  const names = Object.keys(evaluators) as K[];
  const fns = names.map((name) => evaluators[name]);
  const cis = bootstrapVector(
    nItems,
    names.length,
    (idx, len, out) => {
      for (let f = 0; f < fns.length; f++) {
        const v = fns[f](idx, len);
        out[f] = v === null ? NaN : v;
      }
    },
    opts,
  );
  const res = {} as Record<K, ConfidenceInterval>;
  names.forEach((name, f) => (res[name] = cis[f]));
  return res;
}

/** Bootstrap interval of one statistic given as an evaluator over resampled item indices. */
export function bootstrapCI(nItems: number, evaluate: ResampleEvaluator, opts?: BootstrapOptions): ConfidenceInterval {
  return bootstrapMany(nItems, { stat: evaluate }, opts).stat;
}

/**
 * Bootstrap interval of any table statistic that accepts an item selection, e.g.
 * `bootstrapTableStat(table, (t, sel) => cohenKappa(t, 'ana', 'ben', sel))`. Convenient, not the
 * fastest path (studyAgreement uses allocation-free kernels).
 */
export function bootstrapTableStat(
  table: RatingsTable,
  stat: (table: RatingsTable, sel: ItemSelection) => StatResult,
  opts?: BootstrapOptions,
): ConfidenceInterval {
  return bootstrapCI(table.nItems, (idx) => stat(table, { items: idx }).value, opts);
}
