// Number of components from the PCA eigenvalue spectrum: Minka's Laplace evidence, AIC and MDL
// (Wax & Kailath) — on all voxels with a smoothness-corrected sample size (smoothness.ts), or on an
// entropy-rate-guided i.i.d. voxel subsample (iid-subsampling.ts; Li, Adali & Calhoun 2007) — a fixed
// number or a variance fraction, searched within an explicit bound.
import { DecompositionError } from './errors';

export type DimMethod = 'laplace' | 'aic' | 'mdl' | 'iid-aic' | 'iid-mdl' | { variance: number };

/** The default automatic method (chosen by scripts/bench/dimensionality.ts on the realistic phantom; see DEVELOPERS.md). */
export const DEFAULT_DIM_METHOD: DimMethod = 'iid-mdl';

/** Upper end of the automatic search: min(⌊T/3⌋, MAX_COMPONENTS, rank − 1). */
export const MAX_COMPONENTS = 100;

/**
 * ln Γ(x) for x > 0 by the Lanczos approximation (g = 7, 9 coefficients; Lanczos 1964, the widely
 * reproduced coefficient set, from memory), with the reflection formula below 0.5. |error| < 1e-13.
 */
export function logGamma(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905,
    -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x);
  const xm = x - 1;
  let a = c[0]!;
  const t = xm + 7.5;
  for (let i = 1; i < 9; i++) a += c[i]! / (xm + i);
  return 0.5 * Math.log(2 * Math.PI) + (xm + 0.5) * Math.log(t) - t + Math.log(a);
}

/**
 * Minka's Laplace approximation to the log evidence of a rank-`rank` PCA model (Minka 2000,
 * "Automatic choice of dimensionality for PCA", NIPS 13, eq. 30–31), term by term as in
 * scikit-learn 1.2.1 `_assess_dimension`. spectrum: covariance eigenvalues, descending (length p);
 * n: number of samples. Returns −∞ for ranks whose eigenvalue is below 1e-15.
 */
export function minkaLogEvidence(spectrum: ArrayLike<number>, rank: number, n: number): number {
  const p = spectrum.length;
  if (!(rank >= 1 && rank < p)) throw new DecompositionError('bad_option', `The tested rank must lie in [1, ${p - 1}]; got ${rank}.`);
  const eps = 1e-15;
  if (spectrum[rank - 1]! < eps) return -Infinity;
  let pu = -rank * Math.log(2);
  for (let i = 1; i <= rank; i++) pu += logGamma((p - i + 1) / 2) - (Math.log(Math.PI) * (p - i + 1)) / 2;
  let pl = 0;
  for (let i = 0; i < rank; i++) pl += Math.log(spectrum[i]!);
  pl = (-pl * n) / 2;
  let tail = 0;
  for (let i = rank; i < p; i++) tail += spectrum[i]!;
  const v = Math.max(eps, tail / (p - rank));
  const pv = (-Math.log(v) * n * (p - rank)) / 2;
  const m = p * rank - (rank * (rank + 1)) / 2;
  const pp = (Math.log(2 * Math.PI) * (m + rank)) / 2;
  let pa = 0;
  const logN = Math.log(n);
  for (let i = 0; i < rank; i++) {
    const si = spectrum[i]!;
    for (let j = i + 1; j < p; j++) {
      const sj = spectrum[j]!;
      const sjHat = j < rank ? sj : v;
      pa += Math.log((si - sj) * (1 / sjHat - 1 / si)) + logN;
    }
  }
  return pu + pl + pv + pp - pa / 2 - (rank * logN) / 2;
}

/**
 * The plain Minka estimate: argmax of minkaLogEvidence over ranks 1 … min(p − 1, maxRank) — for
 * maxRank ≥ p − 1 the same choice as scikit-learn 1.2.1 PCA(n_components='mle') given the same
 * eigenvalues (explained_variance_) and n = n_samples.
 */
export function minkaDimension(spectrum: ArrayLike<number>, n: number, maxRank = Infinity): number {
  const p = spectrum.length;
  let best = 1;
  let bestLl = -Infinity;
  for (let r = 1; r < p && r <= maxRank; r++) {
    const ll = minkaLogEvidence(spectrum, r, n);
    if (ll > bestLl) {
      bestLl = ll;
      best = r;
    }
  }
  return best;
}

/**
 * Wax & Kailath (1985, IEEE Trans. ASSP 33:387, eq. 16–17) information criteria over k = 0 … p − 1:
 * L(k) = N (p − k) ln(arithmetic mean / geometric mean of the p − k smallest eigenvalues);
 * AIC(k) = 2 L(k) + 2 k (2p − k); MDL(k) = L(k) + ½ k (2p − k) ln N. Returns the minimising k
 * (at least 1) among k ≤ maxRank. spectrum: descending eigenvalues, all > 0; n: samples.
 */
export function informationCriterionDimension(
  spectrum: ArrayLike<number>,
  n: number,
  criterion: 'aic' | 'mdl',
  maxRank = Infinity,
): number {
  const scores = informationCriterionScores(spectrum, n, criterion, maxRank);
  let best = 1;
  for (let k = 2; k < scores.length; k++) if (scores[k]! < scores[best]!) best = k;
  return best;
}

/** AIC(k) or MDL(k) of informationCriterionDimension for k = 1 … min(p − 1, maxRank) (index k; index 0 unused, NaN). */
export function informationCriterionScores(
  spectrum: ArrayLike<number>,
  n: number,
  criterion: 'aic' | 'mdl',
  maxRank = Infinity,
): Float64Array {
  const p = spectrum.length;
  const out = new Float64Array(Math.max(2, Math.min(p - 1, maxRank) + 1)).fill(NaN);
  // Suffix sums of λ and ln λ give each L(k) in O(1).
  const sum = new Float64Array(p + 1);
  const sumLog = new Float64Array(p + 1);
  for (let i = p - 1; i >= 0; i--) {
    sum[i] = sum[i + 1]! + spectrum[i]!;
    sumLog[i] = sumLog[i + 1]! + Math.log(spectrum[i]!);
  }
  for (let k = 1; k < p && k <= maxRank; k++) {
    const q = p - k;
    const logArith = Math.log(sum[k]! / q);
    const logGeo = sumLog[k]! / q;
    const L = n * q * (logArith - logGeo);
    const penalty = k * (2 * p - k);
    out[k] = criterion === 'aic' ? 2 * L + 2 * penalty : L + 0.5 * penalty * Math.log(n);
  }
  return out;
}

/** Smallest k whose leading eigenvalues hold at least `fraction` of the total (0 < fraction ≤ 1). */
export function varianceFractionDimension(spectrum: ArrayLike<number>, fraction: number): number {
  if (!(fraction > 0 && fraction <= 1))
    throw new DecompositionError('bad_option', `A variance fraction must lie in (0, 1]; got ${fraction}.`);
  let total = 0;
  for (let i = 0; i < spectrum.length; i++) total += spectrum[i]!;
  let acc = 0;
  for (let i = 0; i < spectrum.length; i++) {
    acc += spectrum[i]!;
    if (acc >= fraction * total - 1e-12 * total) return i + 1;
  }
  return spectrum.length;
}

/** Number of eigenvalues above 1e-10 × the largest (numerical rank; demeaning/detrending remove some). */
export function numericalRank(spectrum: ArrayLike<number>): number {
  const top = spectrum[0] ?? 0;
  let r = 0;
  while (r < spectrum.length && spectrum[r]! > 1e-10 * top) r++;
  return r;
}

export interface DimensionChoice {
  k: number;
  /** The method as a string: 'laplace' | 'aic' | 'mdl' | 'iid-aic' | 'iid-mdl' | 'variance:F' | 'fixed'. */
  method: string;
  /** The estimate before clamping. */
  estimated: number;
  /** [min, max] the automatic search covers: [2, min(⌊T/3⌋, 100, rank − 1)]; [1, rank] for a fixed number. */
  range: [number, number];
  /** True when an automatic estimate reached the search's upper bound (its true value may be higher). */
  atBound: boolean;
  /** Sample size used by laplace/aic/mdl (voxels corrected for smoothness). */
  effectiveSamples: number;
  /** Voxels kept by the i.i.d. subsampling (N of iid-aic/iid-mdl); null when it was not run. */
  iidSamples: number | null;
  /** Every automatic method's estimate on this run (searched within the same bound), for comparison. */
  estimates: Record<string, number>;
  /** The chosen criterion per k = 1 … bound + 1 (AIC/MDL: lower is better; laplace: log evidence); [] otherwise. */
  curve: number[];
}

export interface DimensionInput {
  components: 'auto' | number;
  method: DimMethod;
  effectiveSamples: number;
  /** Eigenvalues of the i.i.d. voxel subsample's covariance and its voxel count (iid-aic, iid-mdl). */
  iid?: { spectrum: Float64Array; samples: number };
}

/** Upper bound of the automatic search for T time points and numerical rank `rank`. */
export function searchBound(T: number, rank: number): number {
  return Math.max(1, Math.min(Math.floor(T / 3), MAX_COMPONENTS, rank - 1));
}

/**
 * Chooses the number of components. spectrum: descending covariance eigenvalues (length T);
 * effectiveSamples: N for laplace/aic/mdl; iid: the subsample's spectrum and N for iid-aic/iid-mdl;
 * components: 'auto' or a fixed number. Automatic choices are searched up to bound + 1 and clamped to
 * [2, bound], bound = min(⌊T/3⌋, 100, rank − 1) (searchBound): past a third of the volumes, real
 * runs' extra components are not reproducible (REAL-DATA.md). Reaching the bound sets atBound.
 * A fixed number must be 1 … rank.
 */
export function chooseDimension(spectrum: Float64Array, opts: DimensionInput): DimensionChoice {
  const rank = numericalRank(spectrum);
  const T = spectrum.length;
  const hi = searchBound(T, rank);
  const lo = Math.min(2, hi);
  const iidSamples = opts.iid ? opts.iid.samples : null;
  if (opts.components !== 'auto') {
    const k = opts.components;
    if (!Number.isInteger(k) || k < 1 || k > rank) {
      throw new DecompositionError('bad_option', `components must be an integer from 1 to ${rank} (the data's rank); got ${k}.`);
    }
    return {
      k,
      method: 'fixed',
      estimated: k,
      range: [1, rank],
      atBound: false,
      effectiveSamples: opts.effectiveSamples,
      iidSamples,
      estimates: {},
      curve: [],
    };
  }
  if (rank < 3)
    throw new DecompositionError('rank_deficient', `The data have numerical rank ${rank}; at least 3 independent time points are needed.`);
  const s = spectrum.subarray(0, rank);
  const n = opts.effectiveSamples;
  const argmin = (c: Float64Array) => {
    let best = 1;
    for (let k = 2; k < c.length; k++) if (c[k]! < c[best]!) best = k;
    return best;
  };
  const curves: Record<string, Float64Array> = {};
  {
    const ev = new Float64Array(Math.min(rank - 1, hi + 1) + 1).fill(NaN);
    for (let r = 1; r < ev.length; r++) ev[r] = -minkaLogEvidence(s, r, n);
    curves.laplace = ev;
  }
  curves.aic = informationCriterionScores(s, n, 'aic', hi + 1);
  curves.mdl = informationCriterionScores(s, n, 'mdl', hi + 1);
  if (opts.iid) {
    const si = opts.iid.spectrum.subarray(0, Math.max(3, numericalRank(opts.iid.spectrum)));
    curves['iid-aic'] = informationCriterionScores(si, opts.iid.samples, 'aic', hi + 1);
    curves['iid-mdl'] = informationCriterionScores(si, opts.iid.samples, 'mdl', hi + 1);
  }
  const estimates: Record<string, number> = {};
  for (const [name, c] of Object.entries(curves)) estimates[name] = argmin(c);
  let estimated: number;
  let method: string;
  let curve: number[] = [];
  const m = opts.method;
  if (typeof m === 'object') {
    estimated = varianceFractionDimension(s, m.variance);
    method = `variance:${m.variance}`;
  } else if (m === 'laplace' || m === 'aic' || m === 'mdl' || m === 'iid-aic' || m === 'iid-mdl') {
    if (!curves[m]) throw new DecompositionError('bad_option', `The ${m} method needs the i.i.d. voxel subsample; none was given.`);
    estimated = estimates[m]!;
    method = m;
    const sign = m === 'laplace' ? -1 : 1;
    curve = Array.from(curves[m]!.subarray(1), (v) => Number((sign * v).toPrecision(8)));
  } else {
    throw new DecompositionError(
      'bad_option',
      `Unknown dimensionality method ${JSON.stringify(m)}; use iid-mdl, iid-aic, laplace, aic, mdl or {variance: F}.`,
    );
  }
  const k = Math.min(hi, Math.max(lo, estimated));
  return { k, method, estimated, range: [lo, hi], atBound: estimated >= hi, effectiveSamples: n, iidSamples, estimates, curve };
}
