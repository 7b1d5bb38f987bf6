// Voxel × time matrix of a run: mean image, mask, extraction of in-mask voxels, per-voxel
// demeaning, optional linear detrend and variance normalisation.
import type { NiftiImage } from '@/lib/nifti';
import { DecompositionError } from './errors';
import { sharedFloat32 } from './worker-pool';

/** The part of a decoded NIfTI image the decomposition reads (NiftiImage from '@/lib/nifti' fits). */
export type RunImage = Pick<NiftiImage, 'nx' | 'ny' | 'nz' | 'nt' | 'voxelsPerVolume' | 'readVolume'> & {
  header: Pick<NiftiImage['header'], 'trSeconds'>;
};

/**
 * Temporal mean of volumes drop … nt − 1 (full volume, x fastest, Float32Array) and a flag per
 * voxel for any non-finite value over those volumes. Float64 accumulation; non-finite voxels get 0.
 */
export function meanImage(image: RunImage, drop: number): { mean: Float32Array; nonFinite: Uint8Array } {
  const n = image.voxelsPerVolume;
  const acc = new Float64Array(n);
  const bad = new Uint8Array(n);
  const buf = new Float32Array(n);
  for (let t = drop; t < image.nt; t++) {
    image.readVolume(t, buf);
    for (let i = 0; i < n; i++) {
      const v = buf[i]!;
      if (Number.isFinite(v)) acc[i] += v;
      else bad[i] = 1;
    }
  }
  const T = image.nt - drop;
  const mean = new Float32Array(n);
  for (let i = 0; i < n; i++) mean[i] = bad[i] ? 0 : acc[i]! / T;
  return { mean, nonFinite: bad };
}

export interface DataMatrix {
  /** Time-major Float32Array T × V (SharedArrayBuffer-backed): row t = volume drop + t, in-mask voxels. */
  x: Float32Array;
  T: number;
  V: number;
  /** In-mask voxel → full-volume linear index (x fastest), length V. */
  maskIndices: Int32Array;
  /** Voxels removed because their time series was constant (after detrending when on). */
  zeroVarianceVoxels: number;
  /** Temporal SD of each kept voxel before normalisation (data units). */
  temporalSd: Float64Array;
}

/**
 * Builds the preprocessed time-major matrix of the given voxels: x[t, v] = value of voxel v in
 * volume drop + t, minus its temporal mean, minus a least-squares line in t when `detrend`,
 * divided by its temporal SD (1/T) when `varianceNorm`. Voxels with SD ≤ 1e-6 × (|mean| + 1e-12)
 * or exactly 0 are dropped (compacted in place), and so are voxels with any non-finite value (their
 * SD is NaN). With meanAccumulator, the same pass also sums every full volume (finite values) and
 * flags non-finite voxels, so a run with a given mask is read once. Float32 storage, float64
 * accumulation.
 */
export function buildDataMatrix(
  image: RunImage,
  indices: Int32Array,
  drop: number,
  opts: { detrend: boolean; varianceNorm: boolean; meanAccumulator?: { sum: Float64Array; nonFinite: Uint8Array } },
): DataMatrix {
  const T = image.nt - drop;
  let V = indices.length;
  if (V === 0) throw new DecompositionError('empty_mask', 'The mask holds no voxels with finite values; check the mask and the data.');
  const x = sharedFloat32(T * V);
  const buf = new Float32Array(image.voxelsPerVolume);
  for (let t = 0; t < T; t++) {
    image.readVolume(drop + t, buf);
    const off = t * V;
    for (let j = 0; j < V; j++) x[off + j] = buf[indices[j]!]!;
    const acc = opts.meanAccumulator;
    if (acc) {
      for (let i = 0; i < buf.length; i++) {
        const v = buf[i]!;
        if (Number.isFinite(v)) acc.sum[i] += v;
        else acc.nonFinite[i] = 1;
      }
    }
  }
  const mean = new Float64Array(V);
  for (let t = 0; t < T; t++) {
    const off = t * V;
    for (let j = 0; j < V; j++) mean[j] += x[off + j]!;
  }
  for (let j = 0; j < V; j++) mean[j] /= T;
  const slope = new Float64Array(V);
  const tBar = (T - 1) / 2;
  if (opts.detrend && T > 2) {
    let stt = 0;
    for (let t = 0; t < T; t++) stt += (t - tBar) ** 2;
    for (let t = 0; t < T; t++) {
      const off = t * V;
      const dt = t - tBar;
      for (let j = 0; j < V; j++) slope[j] += dt * x[off + j]!;
    }
    for (let j = 0; j < V; j++) slope[j] /= stt;
  }
  const ss = new Float64Array(V);
  for (let t = 0; t < T; t++) {
    const off = t * V;
    const dt = t - tBar;
    for (let j = 0; j < V; j++) {
      const r = x[off + j]! - mean[j]! - slope[j]! * dt;
      x[off + j] = r;
      ss[j] += r * r;
    }
  }
  const sd = new Float64Array(V);
  const keep: number[] = [];
  for (let j = 0; j < V; j++) {
    sd[j] = Math.sqrt(ss[j]! / T);
    if (sd[j]! > 1e-6 * (Math.abs(mean[j]!) + 1e-12) && sd[j]! > 0) keep.push(j);
  }
  const zeroVarianceVoxels = V - keep.length;
  if (keep.length === 0)
    throw new DecompositionError('empty_mask', 'Every in-mask voxel has a constant time series; there is nothing to decompose.');
  const scale = new Float64Array(V).fill(1);
  if (opts.varianceNorm) for (let j = 0; j < V; j++) scale[j] = sd[j]! > 0 ? 1 / sd[j]! : 1;
  let xs = x;
  let idx = indices;
  if (zeroVarianceVoxels > 0) {
    // In-place forward compaction: the write position never passes the read position.
    const V2 = keep.length;
    for (let t = 0; t < T; t++) {
      const src = t * V,
        dst = t * V2;
      for (let q = 0; q < V2; q++) x[dst + q] = x[src + keep[q]!]! * scale[keep[q]!]!;
    }
    xs = x.subarray(0, T * V2);
    idx = Int32Array.from(keep, (j) => indices[j]!);
    const sd2 = Float64Array.from(keep, (j) => sd[j]!);
    V = V2;
    return { x: xs, T, V, maskIndices: idx, zeroVarianceVoxels, temporalSd: sd2 };
  }
  if (opts.varianceNorm) {
    for (let t = 0; t < T; t++) {
      const off = t * V;
      for (let j = 0; j < V; j++) x[off + j] = x[off + j]! * scale[j]!;
    }
  }
  return { x: xs, T, V, maskIndices: idx, zeroVarianceVoxels, temporalSd: sd };
}
