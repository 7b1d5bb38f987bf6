// i.i.d. subsampling of voxels guided by the entropy rate, before AIC/MDL (Li, Adali & Calhoun 2007,
// Human Brain Mapping 28:1251): neighbouring voxels of real fMRI are dependent, so the information
// criteria, which assume independent samples, overshoot. Keeping every s-th voxel along each axis,
// with s large enough that the kept voxels are nearly independent, restores their assumption.
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

/** Largest subsampling depth tried along any axis. */
export const MAX_DEPTH = 8;
/**
 * A subsampled axis counts as i.i.d. when the entropy-rate deficit of its AR(1) approximation,
 * −½ ln(1 − ρ(s)²) nats per sample, is at most this (|ρ(s)| ≤ 0.14; the deficit of a white sequence is 0).
 */
export const ENTROPY_DEFICIT_LIMIT = 0.01;

export interface IidSubsampling {
  /** Depth s along x, y, z: every s-th voxel is kept. */
  depth: [number, number, number];
  /** ρ(s) at the chosen depth along x, y, z (correlation of voxel pairs s apart, both in the mask). */
  lagCorrelation: [number, number, number];
  /** −½ ln(1 − ρ(s)²) at the chosen depth along x, y, z, nats per sample. */
  entropyDeficit: [number, number, number];
  /** In-mask voxel indices (into the V columns) of the kept lattice. */
  voxels: Int32Array;
  /** True when the depth was reduced so that at least minSamples voxels remain. */
  limitedBySamples: boolean;
}

/**
 * Correlation ρ(s) between in-mask voxels `lag` apart along `axis`, over every ⌈T/maxVolumes⌉-th
 * volume of the time-major T × V data x (demeaned per voxel, so products are covariances).
 */
export function lagCorrelation(
  x: Float32Array,
  T: number,
  V: number,
  lookup: Int32Array,
  maskIndices: Int32Array,
  dims: [number, number, number],
  axis: number,
  lag: number,
  maxVolumes = 24,
): number {
  const size = dims[axis]!;
  const stride = axis === 0 ? 1 : axis === 1 ? dims[0] : dims[0] * dims[1];
  const a: number[] = [];
  const b: number[] = [];
  for (let j = 0; j < V; j++) {
    const lin = maskIndices[j]!;
    const coord = Math.floor(lin / stride) % size;
    if (coord + lag >= size) continue;
    const w = lookup[lin + lag * stride]!;
    if (w >= 0) {
      a.push(j);
      b.push(w);
    }
  }
  if (a.length < 10) return 0;
  const step = Math.max(1, Math.ceil(T / maxVolumes));
  let sxy = 0,
    sxx = 0,
    syy = 0;
  for (let t = 0; t < T; t += step) {
    const off = t * V;
    for (let q = 0; q < a.length; q++) {
      const u = x[off + a[q]!]!;
      const v = x[off + b[q]!]!;
      sxy += u * v;
      sxx += u * u;
      syy += v * v;
    }
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : 0;
}

/**
 * Residual of a few volumes after removing the m leading temporal principal components — the part of
 * the data the information criteria judge as noise; its spatial dependence, not the sources' smooth
 * maps, is what makes neighbouring voxels dependent samples. x: time-major T × V; mu: spatial mean
 * per time point; z: whitened data, component-major (≥ m) × V; dewhitening: T × kz row-major
 * (x − μ1ᵀ ≈ dewhitening·z, whitening.ts). Returns nS × V (nS ≤ maxVolumes evenly spaced volumes).
 */
export function residualVolumes(
  x: Float32Array,
  T: number,
  V: number,
  mu: Float64Array,
  z: Float32Array,
  dewhitening: Float64Array,
  kz: number,
  m: number,
  maxVolumes = 24,
): { residual: Float32Array; volumes: number } {
  const step = Math.max(1, Math.ceil(T / maxVolumes));
  const times: number[] = [];
  for (let t = 0; t < T; t += step) times.push(t);
  const out = new Float32Array(times.length * V);
  const acc = new Float64Array(V);
  times.forEach((t, q) => {
    const off = t * V;
    for (let v = 0; v < V; v++) acc[v] = x[off + v]! - mu[t]!;
    for (let i = 0; i < m; i++) {
      const d = dewhitening[t * kz + i]!;
      const zo = i * V;
      for (let v = 0; v < V; v++) acc[v] -= d * z[zo + v]!;
    }
    for (let v = 0; v < V; v++) out[q * V + v] = acc[v]!;
  });
  return { residual: out, volumes: times.length };
}

/**
 * Chooses the subsampling depth per axis as the smallest s whose kept sequence is nearly i.i.d.: the
 * entropy rate of a stationary Gaussian sequence falls short of the entropy of i.i.d. samples of the
 * same variance by −½ ln(1 − ρ²) nats under an AR(1) approximation with lag-one correlation ρ (the
 * innovation variance is σ²(1 − ρ²)); after keeping every s-th voxel the lag-one correlation is the
 * data's ρ(s), measured directly (no assumption about the shape of the smoothing). Li et al. (2007)
 * estimate the entropy rate with the same aim; this AR(1) form of it is ours. The depths are then
 * reduced (largest first) while fewer than minSamples lattice voxels would remain.
 * x: time-major Float32Array T × V (demeaned per voxel) — pass the noise residual (residualVolumes)
 * so that the sources' smooth maps do not count as sample dependence; maskIndices: column →
 * full-volume index.
 */
export function iidSubsampling(
  x: Float32Array,
  T: number,
  V: number,
  maskIndices: Int32Array,
  dims: [number, number, number],
  minSamples: number,
): IidSubsampling {
  const [nx, ny, nz] = dims;
  const lookup = new Int32Array(nx * ny * nz).fill(-1);
  for (let j = 0; j < V; j++) lookup[maskIndices[j]!] = j;
  const deficit = (r: number) => -0.5 * Math.log(1 - Math.min(0.999999, r * r));
  const depth: [number, number, number] = [1, 1, 1];
  const rho: [number, number, number] = [0, 0, 0];
  const rhoAt: number[][] = [[], [], []];
  for (let axis = 0; axis < 3; axis++) {
    const maxS = Math.max(1, Math.min(MAX_DEPTH, Math.floor(dims[axis]! / 4)));
    let s = 1;
    for (; s <= maxS; s++) {
      const r = lagCorrelation(x, T, V, lookup, maskIndices, dims, axis, s);
      rhoAt[axis]![s] = r;
      if (deficit(r) <= ENTROPY_DEFICIT_LIMIT) break;
    }
    depth[axis] = Math.min(s, maxS);
    rho[axis] = rhoAt[axis]![depth[axis]]!;
  }
  const lattice = (d: [number, number, number]): Int32Array => {
    // Offsets centre the lattice in the grid, so the kept voxels are spread over the whole brain.
    const off = d.map((s, a) => Math.floor(((dims[a]! - 1) % s) / 2));
    const out: number[] = [];
    for (let j = 0; j < V; j++) {
      const lin = maskIndices[j]!;
      const i = lin % nx,
        y = Math.floor(lin / nx) % ny,
        z = Math.floor(lin / (nx * ny));
      if ((i - off[0]!) % d[0] === 0 && (y - off[1]!) % d[1] === 0 && (z - off[2]!) % d[2] === 0) out.push(j);
    }
    return Int32Array.from(out);
  };
  let voxels = lattice(depth);
  let limited = false;
  while (voxels.length < minSamples && depth.some((s) => s > 1)) {
    const a = depth.indexOf(Math.max(...depth));
    depth[a]--;
    limited = true;
    voxels = lattice(depth);
  }
  for (let a = 0; a < 3; a++) {
    if (rhoAt[a]![depth[a]] === undefined) rhoAt[a]![depth[a]] = lagCorrelation(x, T, V, lookup, maskIndices, dims, a, depth[a]);
    rho[a] = rhoAt[a]![depth[a]]!;
  }
  return { depth, lagCorrelation: rho, entropyDeficit: rho.map(deficit) as [number, number, number], voxels, limitedBySamples: limited };
}

/**
 * Eigenvalues (descending, clipped at 0) of the T × T covariance of the kept voxels only,
 * C = (X_S − μ1ᵀ)(X_S − μ1ᵀ)ᵀ / (N − 1) with μ the mean over the kept voxels per time point — the
 * sample covariance whose eigenvalues AIC/MDL then judge with N = number of kept voxels.
 */
export function subsampledSpectrum(x: Float32Array, T: number, V: number, voxels: Int32Array): Float64Array {
  const N = voxels.length;
  const rows = new Float64Array(T * N);
  for (let t = 0; t < T; t++) {
    const off = t * V;
    let m = 0;
    for (let q = 0; q < N; q++) m += rows[t * N + q] = x[off + voxels[q]!]!;
    m /= N;
    for (let q = 0; q < N; q++) rows[t * N + q]! -= m;
  }
  const cov = new Matrix(T, T);
  for (let a = 0; a < T; a++) {
    const ra = a * N;
    for (let b = a; b < T; b++) {
      const rb = b * N;
      let s = 0;
      for (let q = 0; q < N; q++) s += rows[ra + q]! * rows[rb + q]!;
      s /= N - 1;
      cov.set(a, b, s);
      cov.set(b, a, s);
    }
  }
  const values = new EigenvalueDecomposition(cov, { assumeSymmetric: true }).realEigenvalues;
  return Float64Array.from(values.map((v) => Math.max(0, v)).sort((p, q) => q - p));
}
