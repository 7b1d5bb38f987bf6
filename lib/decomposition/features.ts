// Per-component features shown to raters on the rating desk (DESIGN.md §4 step 6) and written to
// the classifier training table.

import { labelComponents, volumeSize } from './connected-components';
import { framewiseDisplacement, motionLength, type MotionParams } from './motion';

/** Features of one component; see computeComponentFeatures for every definition. */
export interface ComponentFeatures {
  highFrequencyPower: number;
  edgeFraction: number;
  clusterCount: number;
  largestClusterVoxels: number;
  largestClusterFraction: number;
  kurtosis: number;
  skewness: number;
  peakZ: number;
  spikeScore: number;
  motionCorrelation: number | null;
  fdCorrelation: number | null;
  meanFramewiseDisplacement: number | null;
  temporalAutocorrelation: number;
}

/** Raised when the inputs of one component do not fit together. */
export class FeatureInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'FeatureInputError';
  }
}

/** |z| above which a map voxel counts as supra-threshold (a conventional map threshold; common practice, no source). */
export const DEFAULT_Z_THRESHOLD = 2.3;
/** Lower edge of the "high-frequency" band in Hz (Cordes et al. 2001, AJNR 22:1326: BOLD power lies mostly below ~0.1 Hz). */
export const HIGH_FREQUENCY_CUTOFF_HZ = 0.1;
/** Smallest 26-connected cluster (voxels) counted by clusterCount. Our own choice. */
export const DEFAULT_MIN_CLUSTER_VOXELS = 10;
/** Width of the brain-mask edge in voxels (6-neighbour steps from outside the mask). */
export const DEFAULT_EDGE_DEPTH = 1;
/** Sphere radius (mm) for framewise displacement (Power et al. 2012). */
export const FD_RADIUS_MM = 50;

/**
 * Computes the features of one component.
 *
 * Inputs: `map` z-scored spatial map over in-mask voxels (length V); `maskIndices[i]` the full-volume
 * linear index (x fastest) of in-mask voxel i; `dims` the grid; `timecourse` length T (one value per
 * retained volume); `spectrum` from powerSpectrum (Hz); `motion` optional, length T (initial volumes
 * already dropped). Optional `zThreshold` (default 2.3), `minClusterVoxels` (10), `edgeDepth` (1).
 *
 * - highFrequencyPower: Σ power(f > 0.1 Hz) / Σ power(f > 0), unitless 0..1 (0 when no power).
 *   Bins are equally spaced, so the ratio of sums equals the ratio of integrals.
 * - edgeFraction: of the supra-threshold voxels (|z| > zThreshold), the fraction on the mask edge.
 *   Edge = in-mask voxels within `edgeDepth` 6-neighbour steps of a voxel outside the mask (or
 *   outside the grid); depth 1 = in-mask voxels with a 6-neighbour outside. 0 without supra voxels.
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
 * - motionCorrelation: max |Pearson r| between the time course and 12 regressors: the 6 motion
 *   parameters and their backward differences (x_t − x_{t−1}, first value 0). Squares (as in 24-
 *   parameter models) are left out: they add little for a max-|r| summary. Constant regressors
 *   are skipped. null without motion.
 * - fdCorrelation: Pearson r (signed) with framewise displacement; 0 if either is constant; null
 *   without motion.
 * - meanFramewiseDisplacement: mean FD over volumes 1..T−1 in mm (FD_0 = 0 is left out); null
 *   without motion.
 * - temporalAutocorrelation: lag-1 autocorrelation Σ(x_t − x̄)(x_{t+1} − x̄) / Σ(x_t − x̄)², the
 *   usual biased sample ACF estimator; 0 for a constant time course.
 */
export function computeComponentFeatures(input: {
  map: Float32Array;
  maskIndices: Int32Array;
  dims: [number, number, number];
  timecourse: Float64Array;
  trSeconds: number;
  motion?: MotionParams;
  spectrum: { frequencies: Float64Array; power: Float64Array };
  zThreshold?: number;
  minClusterVoxels?: number;
  edgeDepth?: number;
}): ComponentFeatures {
  const { map, maskIndices, dims, timecourse, spectrum } = input;
  const zThreshold = input.zThreshold ?? DEFAULT_Z_THRESHOLD;
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
  if (!(zThreshold > 0)) throw new FeatureInputError(`zThreshold must be positive, got ${zThreshold}.`);
  if (!Number.isInteger(edgeDepth) || edgeDepth < 1) {
    throw new FeatureInputError(`edgeDepth must be a whole number of voxels ≥ 1, got ${edgeDepth}.`);
  }
  if (!(input.trSeconds > 0)) throw new FeatureInputError(`TR must be positive seconds, got ${input.trSeconds}.`);
  if (spectrum.frequencies.length !== spectrum.power.length) {
    throw new FeatureInputError('Spectrum frequencies and power have different lengths; pass the output of powerSpectrum.');
  }

  const spatial = spatialFeatures(map, maskIndices, dims, zThreshold, minCluster, edgeDepth);
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
    fdCorrelation = pearson(timecourse, fd) ?? 0;
    let sum = 0;
    for (let i = 1; i < t; i++) sum += fd[i];
    meanFramewiseDisplacement = t > 1 ? sum / (t - 1) : 0;
  }

  return {
    highFrequencyPower: highFrequencyFraction(spectrum.frequencies, spectrum.power, HIGH_FREQUENCY_CUTOFF_HZ),
    ...spatial,
    kurtosis: moments.kurtosis,
    skewness: moments.skewness,
    peakZ: moments.peakAbs,
    spikeScore: spikeScore(timecourse),
    motionCorrelation,
    fdCorrelation,
    meanFramewiseDisplacement,
    temporalAutocorrelation: lag1Autocorrelation(timecourse),
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

/** Edge fraction and cluster features of a map; see computeComponentFeatures. */
function spatialFeatures(
  map: Float32Array,
  maskIndices: Int32Array,
  dims: [number, number, number],
  zThreshold: number,
  minCluster: number,
  edgeDepth: number,
): Pick<ComponentFeatures, 'edgeFraction' | 'clusterCount' | 'largestClusterVoxels' | 'largestClusterFraction'> {
  const nVox = dims[0] * dims[1] * dims[2];
  const inMask = new Uint8Array(nVox);
  for (let i = 0; i < maskIndices.length; i++) inMask[maskIndices[i]] = 1;
  const edge = maskEdge(inMask, dims, edgeDepth);
  const supra = new Uint8Array(nVox);
  let nSupra = 0;
  let nSupraEdge = 0;
  for (let i = 0; i < map.length; i++) {
    if (Math.abs(map[i]) > zThreshold) {
      const j = maskIndices[i];
      supra[j] = 1;
      nSupra++;
      if (edge[j]) nSupraEdge++;
    }
  }
  if (nSupra === 0) return { edgeFraction: 0, clusterCount: 0, largestClusterVoxels: 0, largestClusterFraction: 0 };
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
  };
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
