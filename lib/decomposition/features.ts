// Per-component features shown to raters on the rating desk (DESIGN.md §4 step 6) and written to
// the classifier training table.

import { DEFAULT_MASK_THRESHOLD_FRACTION, percentileSorted } from './brain-mask';
import { labelComponents, volumeSize } from './connected-components';
import { framewiseDisplacement, motionLength, type MotionParams } from './motion';

/** Features of one component; see computeComponentFeatures for every definition. */
export interface ComponentFeatures {
  highFrequencyPower: number;
  /** null when the map has too few supra-threshold voxels for spatial features (see spatialFeatures). */
  edgeFraction: number | null;
  clusterCount: number | null;
  largestClusterVoxels: number | null;
  largestClusterFraction: number | null;
  /** |z| above which a voxel counted as supra-threshold for this map; null when undefined. */
  mapThresholdZ: number | null;
  kurtosis: number;
  skewness: number;
  peakZ: number;
  spikeScore: number;
  stepScore: number | null;
  trendR2: number | null;
  motionCorrelation: number | null;
  fdCorrelation: number | null;
  meanFramewiseDisplacement: number | null;
  temporalAutocorrelation: number;
  /** Cross-restart reproducibility 0..1 (pipeline); null when restarts were not run. */
  reproducibility: number | null;
}

/** Raised when the inputs of one component do not fit together. */
export class FeatureInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'FeatureInputError';
  }
}

/**
 * Robust-z cut for supra-threshold map voxels: a voxel counts when |z − median| exceeds this many
 * robust SDs (1.4826·MAD) of its map. 2.5 is the moderately conservative cut recommended by Leys
 * et al. (2013, J. Exp. Soc. Psychol. 49:764) for median-absolute-deviation outlier rules. The
 * cut adapts to each map: the bulk of a component map is near-Gaussian noise and its robust SD
 * is the spread of that bulk, so the cut sits just above the noise whatever the map's tail weight.
 */
export const DEFAULT_ROBUST_Z_CUT = 2.5;
/** Lower edge of the "high-frequency" band in Hz (Cordes et al. 2001, AJNR 22:1326: BOLD power lies mostly below ~0.1 Hz). */
export const HIGH_FREQUENCY_CUTOFF_HZ = 0.1;
/** Smallest 26-connected cluster (voxels) counted by clusterCount, and the fewest supra-threshold voxels for spatial features. Our own choice. */
export const DEFAULT_MIN_CLUSTER_VOXELS = 10;
/** Width of the brain edge in voxels (6-neighbour steps from a non-brain voxel). */
export const DEFAULT_EDGE_DEPTH = 1;
/** Fewest volumes on each side of a split for stepScore: max(this, 5 % of T). Our own choice. */
export const MIN_STEP_SIDE = 5;
/** Sphere radius (mm) for framewise displacement (Power et al. 2012). */
export const FD_RADIUS_MM = 50;

/**
 * Computes the features of one component.
 *
 * Inputs: `map` z-scored spatial map over in-mask voxels (length V); `maskIndices[i]` the full-volume
 * linear index (x fastest) of in-mask voxel i; `dims` the grid; `timecourse` length T (one value per
 * retained volume); `spectrum` from powerSpectrum (Hz); `motion` optional, length T (initial volumes
 * already dropped); `meanImage` optional full-volume temporal mean (marks dark in-mask voxels as
 * non-brain for the edge, see brainEdge); `edge` optional precomputed brainEdge (one per run).
 * Options: `robustZCut` (2.5), `minClusterVoxels` (10), `edgeDepth` (1), `reproducibility`.
 *
 * A feature that does not exist for a component is null, never 0 (a number shown to a rater must
 * mean what it says).
 *
 * - highFrequencyPower: Σ power(f > 0.1 Hz) / Σ power(f > 0), unitless 0..1 (0 when no power).
 *   Bins are equally spaced, so the ratio of sums equals the ratio of integrals.
 * - mapThresholdZ: the adaptive cut in the map's own z units, median + robustZCut·σ̂ (σ̂ = 1.4826·MAD
 *   of the map; mean absolute deviation × √(π/2) when the MAD is 0); a voxel is supra-threshold
 *   when |z − median| > robustZCut·σ̂. null (and the four spatial features below with it) when the
 *   map has fewer than minClusterVoxels supra-threshold voxels or no spread: then the map has no
 *   voxels that stand out and "where its strong voxels lie" is undefined. The threshold reported
 *   is the larger of the positive and negative cuts' magnitudes.
 * - edgeFraction: of the supra-threshold voxels, the fraction on the brain edge (brainEdge).
 * - clusterCount: number of 26-connected clusters of supra-threshold voxels with ≥ minClusterVoxels;
 *   largestClusterVoxels: size of the largest cluster (any size); largestClusterFraction: that
 *   size / number of supra-threshold voxels.
 * - kurtosis, skewness: population moments of the map (m4/m2² − 3 and m3/m2^1.5, i.e.
 *   scipy.stats kurtosis(fisher=True, bias=True) and skew(bias=True)); 0 for a constant map.
 * - peakZ: max |z|.
 * - spikeScore: d = first difference of the time course; max |d − median(d)| / (1.4826·MAD(d)),
 *   the largest robust z of a frame-to-frame jump (1.4826 makes the MAD consistent with σ for
 *   Gaussian data; common practice, no source). If MAD = 0 the mean absolute deviation × √(π/2)
 *   is used instead; 0 when the time course does not change.
 * - stepScore: the largest mean shift at any split point in SD units: max over splits k of
 *   |mean(x[k..T)) − mean(x[0..k))| / s_k, s_k the pooled within-side SD √((SS_before + SS_after)/(T − 2)),
 *   each side at least max(5, ⌈0.05·T⌉) volumes (see stepScore). null when T is too short.
 * - trendR2: R² of the least-squares fit of the time course by a constant + linear + quadratic
 *   trend in time (slow drift); null when T < 4 or the time course is constant.
 * - motionCorrelation: max |Pearson r| between the time course and 12 regressors: the 6 motion
 *   parameters and their backward differences (x_t − x_{t−1}, first value 0). Squares (as in 24-
 *   parameter models) are left out: they add little for a max-|r| summary. Constant regressors
 *   are skipped. null without motion.
 * - fdCorrelation: Pearson r (signed) with framewise displacement; null without motion or when
 *   either series is constant.
 * - meanFramewiseDisplacement: mean FD over volumes 1..T−1 in mm (FD_0 = 0 is left out); null
 *   without motion.
 * - temporalAutocorrelation: lag-1 autocorrelation Σ(x_t − x̄)(x_{t+1} − x̄) / Σ(x_t − x̄)², the
 *   usual biased sample ACF estimator; 0 for a constant time course.
 * - reproducibility: passed through from the decomposition (0..1; null when not computed).
 */
export function computeComponentFeatures(input: {
  map: Float32Array;
  maskIndices: Int32Array;
  dims: [number, number, number];
  timecourse: Float64Array;
  trSeconds: number;
  motion?: MotionParams;
  spectrum: { frequencies: Float64Array; power: Float64Array };
  meanImage?: Float32Array;
  edge?: Uint8Array;
  robustZCut?: number;
  minClusterVoxels?: number;
  edgeDepth?: number;
  reproducibility?: number | null;
}): ComponentFeatures {
  const { map, maskIndices, dims, timecourse, spectrum } = input;
  const cut = input.robustZCut ?? DEFAULT_ROBUST_Z_CUT;
  const minCluster = input.minClusterVoxels ?? DEFAULT_MIN_CLUSTER_VOXELS;
  const edgeDepth = input.edgeDepth ?? DEFAULT_EDGE_DEPTH;
  const nVox = volumeSize(dims);
  if (map.length !== maskIndices.length) {
    throw new FeatureInputError(
      `Map has ${map.length} values but the mask has ${maskIndices.length} voxels; pass the map over the same in-mask voxels.`,
    );
  }
  for (let i = 0; i < maskIndices.length; i++) {
    const j = maskIndices[i];
    if (j < 0 || j >= nVox) {
      throw new FeatureInputError(`Mask index ${j} (in-mask voxel ${i}) lies outside the ${dims.join('×')} grid.`);
    }
  }
  if (!(cut > 0)) throw new FeatureInputError(`robustZCut must be positive, got ${cut}.`);
  if (!Number.isInteger(edgeDepth) || edgeDepth < 1) {
    throw new FeatureInputError(`edgeDepth must be a whole number of voxels ≥ 1, got ${edgeDepth}.`);
  }
  if (!(input.trSeconds > 0)) throw new FeatureInputError(`TR must be positive seconds, got ${input.trSeconds}.`);
  if (spectrum.frequencies.length !== spectrum.power.length) {
    throw new FeatureInputError('Spectrum frequencies and power have different lengths; pass the output of powerSpectrum.');
  }
  if (input.meanImage && input.meanImage.length !== nVox) {
    throw new FeatureInputError(`The mean image has ${input.meanImage.length} voxels but the grid ${dims.join('×')} has ${nVox}.`);
  }
  if (input.edge && input.edge.length !== nVox) {
    throw new FeatureInputError(`The edge volume has ${input.edge.length} voxels but the grid ${dims.join('×')} has ${nVox}.`);
  }

  const edge = input.edge ?? brainEdge(maskIndices, dims, { meanImage: input.meanImage, depth: edgeDepth });
  const spatial = spatialFeatures(map, maskIndices, dims, edge, cut, minCluster);
  const moments = mapMoments(map);

  let motionCorrelation: number | null = null;
  let fdCorrelation: number | null = null;
  let meanFramewiseDisplacement: number | null = null;
  if (input.motion) {
    const t = motionLength(input.motion);
    if (t !== timecourse.length) {
      throw new FeatureInputError(
        `Motion table has ${t} rows but the time course has ${timecourse.length} volumes; drop the same initial volumes from both.`,
      );
    }
    motionCorrelation = maxMotionCorrelation(timecourse, input.motion);
    const fd = framewiseDisplacement(input.motion, FD_RADIUS_MM);
    fdCorrelation = pearson(timecourse, fd);
    let sum = 0;
    for (let i = 1; i < t; i++) sum += fd[i];
    meanFramewiseDisplacement = t > 1 ? sum / (t - 1) : null;
  }

  return {
    highFrequencyPower: highFrequencyFraction(spectrum.frequencies, spectrum.power, HIGH_FREQUENCY_CUTOFF_HZ),
    ...spatial,
    kurtosis: moments.kurtosis,
    skewness: moments.skewness,
    peakZ: moments.peakAbs,
    spikeScore: spikeScore(timecourse),
    stepScore: stepScore(timecourse),
    trendR2: trendR2(timecourse),
    motionCorrelation,
    fdCorrelation,
    meanFramewiseDisplacement,
    temporalAutocorrelation: lag1Autocorrelation(timecourse),
    reproducibility: input.reproducibility ?? null,
  };
}

/** Fraction of power in bins with f > cutoffHz among bins with f > 0 (unitless); 0 if no power. */
export function highFrequencyFraction(frequencies: Float64Array, power: Float64Array, cutoffHz: number): number {
  let total = 0;
  let high = 0;
  for (let k = 0; k < frequencies.length; k++) {
    if (!(frequencies[k] > 0)) continue;
    total += power[k];
    if (frequencies[k] > cutoffHz) high += power[k];
  }
  return total > 0 ? high / total : 0;
}

type SpatialFeatures = Pick<
  ComponentFeatures,
  'edgeFraction' | 'clusterCount' | 'largestClusterVoxels' | 'largestClusterFraction' | 'mapThresholdZ'
>;

const UNDEFINED_SPATIAL: SpatialFeatures = {
  edgeFraction: null,
  clusterCount: null,
  largestClusterVoxels: null,
  largestClusterFraction: null,
  mapThresholdZ: null,
};

/** Edge fraction and cluster features of a map on its adaptive threshold; see computeComponentFeatures. */
function spatialFeatures(
  map: Float32Array,
  maskIndices: Int32Array,
  dims: [number, number, number],
  edge: Uint8Array,
  cut: number,
  minCluster: number,
): SpatialFeatures {
  const n = map.length;
  if (n === 0) return UNDEFINED_SPATIAL;
  const values = Float64Array.from(map);
  const med = median(values);
  const dev = new Float64Array(n);
  let sumDev = 0;
  for (let i = 0; i < n; i++) {
    dev[i] = Math.abs(values[i] - med);
    sumDev += dev[i];
  }
  let scale = 1.4826 * median(dev);
  if (!(scale > 0)) scale = (sumDev / n) * Math.sqrt(Math.PI / 2);
  if (!(scale > 0)) return UNDEFINED_SPATIAL;
  const limit = cut * scale;
  const nVox = dims[0] * dims[1] * dims[2];
  const supra = new Uint8Array(nVox);
  let nSupra = 0;
  let nSupraEdge = 0;
  for (let i = 0; i < n; i++) {
    if (dev[i] > limit) {
      const j = maskIndices[i];
      supra[j] = 1;
      nSupra++;
      if (edge[j]) nSupraEdge++;
    }
  }
  if (nSupra < minCluster) return UNDEFINED_SPATIAL;
  const { sizes } = labelComponents(supra, dims, 26);
  let largest = 0;
  let count = 0;
  for (const s of sizes) {
    if (s > largest) largest = s;
    if (s >= minCluster) count++;
  }
  return {
    edgeFraction: nSupraEdge / nSupra,
    clusterCount: count,
    largestClusterVoxels: largest,
    largestClusterFraction: largest / nSupra,
    mapThresholdZ: Math.max(Math.abs(med + limit), Math.abs(med - limit)),
  };
}

/**
 * The brain edge for edgeFraction: in-mask voxels within `depth` 6-neighbour steps of a non-brain
 * voxel, where non-brain = outside the mask (or the grid) or, when the temporal mean image is
 * given, an in-mask voxel darker than the automatic mask's tissue threshold (brain-mask.ts:
 * DEFAULT_MASK_THRESHOLD_FRACTION × 98th percentile of the positive mean). Dark in-mask voxels are
 * skull or dropout that the mask's hole filling took in; they are edge themselves. So when a mask
 * reaches past the skull into the scalp, the brain's outline against the dark skull still counts
 * as edge, and the scalp (against air and skull) does too: a thin motion ring at the brain
 * surface scores high whether or not the mask is tight. Full-volume Uint8Array (x fastest), 1 = edge.
 */
export function brainEdge(
  maskIndices: Int32Array,
  dims: [number, number, number],
  opts: { meanImage?: Float32Array; depth?: number } = {},
): Uint8Array {
  const nVox = volumeSize(dims);
  const brain = new Uint8Array(nVox);
  for (let i = 0; i < maskIndices.length; i++) brain[maskIndices[i]] = 1;
  const darkCut = opts.meanImage ? tissueThreshold(opts.meanImage) : -Infinity;
  const inMask = Uint8Array.from(brain);
  if (opts.meanImage) {
    for (let i = 0; i < maskIndices.length; i++) {
      const j = maskIndices[i];
      if (!(opts.meanImage[j] > darkCut)) brain[j] = 0;
    }
  }
  const edge = maskEdge(brain, dims, opts.depth ?? DEFAULT_EDGE_DEPTH);
  for (let j = 0; j < nVox; j++) if (inMask[j] && !brain[j]) edge[j] = 1;
  return edge;
}

/** The automatic mask's intensity threshold of a mean image (brain-mask.ts), −∞ when no positive voxel. */
function tissueThreshold(mean: Float32Array): number {
  const positive: number[] = [];
  for (let i = 0; i < mean.length; i++) if (Number.isFinite(mean[i]) && mean[i] > 0) positive.push(mean[i]);
  if (positive.length === 0) return -Infinity;
  return DEFAULT_MASK_THRESHOLD_FRACTION * percentileSorted(Float64Array.from(positive).sort(), 98);
}

/**
 * Brain-mask edge: in-mask voxels within `depth` 6-neighbour steps of a non-mask voxel or of the
 * grid border. Full-volume Uint8Array (x fastest), 1 = edge.
 */
export function maskEdge(inMask: Uint8Array, dims: [number, number, number], depth = 1): Uint8Array {
  const [nx, ny, nz] = dims;
  const edge = new Uint8Array(inMask.length);
  // Ring 0 is "outside"; ring r voxels are in-mask voxels with a 6-neighbour in ring r−1.
  let frontier = new Uint8Array(inMask.length);
  for (let i = 0; i < inMask.length; i++) frontier[i] = inMask[i] ? 0 : 1;
  for (let r = 1; r <= depth; r++) {
    const next = new Uint8Array(inMask.length);
    for (let z = 0; z < nz; z++) {
      for (let y = 0; y < ny; y++) {
        for (let x = 0; x < nx; x++) {
          const i = x + nx * (y + ny * z);
          if (!inMask[i] || edge[i]) continue;
          const touches =
            (r === 1 && (x === 0 || y === 0 || z === 0 || x === nx - 1 || y === ny - 1 || z === nz - 1)) ||
            (x > 0 && frontier[i - 1] === 1) ||
            (x < nx - 1 && frontier[i + 1] === 1) ||
            (y > 0 && frontier[i - nx] === 1) ||
            (y < ny - 1 && frontier[i + nx] === 1) ||
            (z > 0 && frontier[i - nx * ny] === 1) ||
            (z < nz - 1 && frontier[i + nx * ny] === 1);
          if (touches) {
            edge[i] = 1;
            next[i] = 1;
          }
        }
      }
    }
    frontier = next;
  }
  return edge;
}

/**
 * Population skewness m3/m2^1.5, excess kurtosis m4/m2² − 3 (central moments with divisor n, as
 * scipy.stats with bias=True) and max |value|. Float64 accumulation; 0, 0 for a constant input.
 */
export function mapMoments(values: ArrayLike<number>): { skewness: number; kurtosis: number; peakAbs: number } {
  const n = values.length;
  if (n === 0) return { skewness: 0, kurtosis: 0, peakAbs: 0 };
  let mean = 0;
  let peakAbs = 0;
  for (let i = 0; i < n; i++) {
    mean += values[i];
    const a = Math.abs(values[i]);
    if (a > peakAbs) peakAbs = a;
  }
  mean /= n;
  let m2 = 0;
  let m3 = 0;
  let m4 = 0;
  for (let i = 0; i < n; i++) {
    const d = values[i] - mean;
    const d2 = d * d;
    m2 += d2;
    m3 += d2 * d;
    m4 += d2 * d2;
  }
  m2 /= n;
  m3 /= n;
  m4 /= n;
  // Same "effectively constant" test as scipy.stats: m2 below (float64 resolution × mean)².
  if (m2 === 0 || m2 <= (1e-15 * mean) ** 2) return { skewness: 0, kurtosis: 0, peakAbs };
  return { skewness: m3 / m2 ** 1.5, kurtosis: m4 / (m2 * m2) - 3, peakAbs };
}

/** Largest robust z of the first difference of a time course; see computeComponentFeatures. Unitless. */
export function spikeScore(tc: ArrayLike<number>): number {
  const n = tc.length - 1;
  if (n < 2) return 0;
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = tc[i + 1] - tc[i];
  const med = median(d);
  const dev = new Float64Array(n);
  let maxDev = 0;
  let sumDev = 0;
  for (let i = 0; i < n; i++) {
    dev[i] = Math.abs(d[i] - med);
    sumDev += dev[i];
    if (dev[i] > maxDev) maxDev = dev[i];
  }
  if (maxDev === 0) return 0;
  let scale = 1.4826 * median(dev);
  if (!(scale > 0)) scale = (sumDev / n) * Math.sqrt(Math.PI / 2);
  return maxDev / scale;
}

/**
 * Largest mean shift at any split point in SD units (a step in the time course): for every split
 * k with at least m = max(MIN_STEP_SIDE, ⌈0.05·T⌉) volumes on each side, |x̄_after − x̄_before| / s_k
 * with s_k = √((SS_before + SS_after)/(T − 2)) the pooled within-side SD (the two-sample
 * statistic without its √n factor, so it reads as "the jump is this many SDs of the noise around
 * it"; common practice, no source). O(T) by prefix sums. null when T < 2m or the sides are flat
 * (s_k = 0 for every split). Unitless.
 */
export function stepScore(tc: ArrayLike<number>): number | null {
  const n = tc.length;
  const m = Math.max(MIN_STEP_SIDE, Math.ceil(0.05 * n));
  if (n < 2 * m || n < 3) return null;
  const s1 = new Float64Array(n + 1);
  const s2 = new Float64Array(n + 1);
  let mean = 0;
  for (let i = 0; i < n; i++) mean += tc[i];
  mean /= n;
  for (let i = 0; i < n; i++) {
    const v = tc[i] - mean; // centred for accuracy of the sums of squares
    s1[i + 1] = s1[i] + v;
    s2[i + 1] = s2[i] + v * v;
  }
  let best: number | null = null;
  for (let k = m; k <= n - m; k++) {
    const nb = k,
      na = n - k;
    const sb = s1[k],
      sa = s1[n] - s1[k];
    const ssb = s2[k] - (sb * sb) / nb;
    const ssa = s2[n] - s2[k] - (sa * sa) / na;
    const pooled = Math.sqrt(Math.max(0, ssb + ssa) / (n - 2));
    if (!(pooled > 0)) continue;
    const shift = Math.abs(sa / na - sb / nb) / pooled;
    if (best === null || shift > best) best = shift;
  }
  return best;
}

/**
 * R² of the least-squares fit of the time course by 1, t, t² (linear + quadratic trend): the share
 * of its variance that is slow drift. Solved on centred, scaled orthogonal (Gram–Schmidt)
 * polynomials for accuracy. Unitless 0..1; null when T < 4 or the time course is constant.
 */
export function trendR2(tc: ArrayLike<number>): number | null {
  const n = tc.length;
  if (n < 4) return null;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += tc[i];
  mean /= n;
  let sst = 0;
  for (let i = 0; i < n; i++) sst += (tc[i] - mean) ** 2;
  if (!(sst > 0)) return null;
  // p1 = centred t; p2 = t² orthogonalised against 1 and p1.
  const c = (n - 1) / 2;
  const p1 = Float64Array.from({ length: n }, (_, i) => (i - c) / n);
  const q = Float64Array.from({ length: n }, (_, i) => p1[i] * p1[i]);
  let qm = 0;
  for (let i = 0; i < n; i++) qm += q[i];
  qm /= n;
  let q1 = 0,
    p11 = 0;
  for (let i = 0; i < n; i++) {
    q[i] -= qm;
    q1 += q[i] * p1[i];
    p11 += p1[i] * p1[i];
  }
  for (let i = 0; i < n; i++) q[i] -= (q1 / p11) * p1[i];
  let y1 = 0,
    y2 = 0,
    p22 = 0;
  for (let i = 0; i < n; i++) {
    const y = tc[i] - mean;
    y1 += y * p1[i];
    y2 += y * q[i];
    p22 += q[i] * q[i];
  }
  const ssr = (y1 * y1) / p11 + (p22 > 0 ? (y2 * y2) / p22 : 0);
  return Math.min(1, Math.max(0, ssr / sst));
}

/** Median of a copy of the values (mean of the two middle values for even length). */
function median(values: Float64Array): number {
  const s = Float64Array.from(values).sort();
  const m = s.length >> 1;
  return s.length % 2 === 1 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** Pearson correlation of two equal-length series; null when either has zero variance. */
export function pearson(a: ArrayLike<number>, b: ArrayLike<number>): number | null {
  const n = a.length;
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i];
    mb += b[i];
  }
  ma /= n;
  mb /= n;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    const da = a[i] - ma;
    const db = b[i] - mb;
    sab += da * db;
    saa += da * da;
    sbb += db * db;
  }
  if (!(saa > 0) || !(sbb > 0)) return null;
  return Math.max(-1, Math.min(1, sab / Math.sqrt(saa * sbb)));
}

/** Max |r| of the time course with the 6 motion parameters and their backward differences. */
export function maxMotionCorrelation(tc: Float64Array, m: MotionParams): number {
  let best = 0;
  const t = tc.length;
  const deriv = new Float64Array(t);
  for (const col of [...m.translations, ...m.rotations]) {
    const r = pearson(tc, col);
    if (r !== null && Math.abs(r) > best) best = Math.abs(r);
    for (let i = 1; i < t; i++) deriv[i] = col[i] - col[i - 1];
    const rd = pearson(tc, deriv);
    if (rd !== null && Math.abs(rd) > best) best = Math.abs(rd);
  }
  return best;
}

/** Lag-1 sample autocorrelation Σ(x_t − x̄)(x_{t+1} − x̄) / Σ(x_t − x̄)²; 0 when constant. */
export function lag1Autocorrelation(tc: ArrayLike<number>): number {
  const n = tc.length;
  if (n < 2) return 0;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += tc[i];
  mean /= n;
  let num = 0;
  let den = 0;
  for (let i = 0; i < n; i++) {
    const d = tc[i] - mean;
    den += d * d;
    if (i + 1 < n) num += d * (tc[i + 1] - mean);
  }
  return den > 0 ? num / den : 0;
}
