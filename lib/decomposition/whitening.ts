// PCA reduction and whitening of the voxel × time data to k × V (spatial ICA input).
import { KernelPool, sharedFloat32 } from './worker-pool';

export interface Whitened {
  /** Whitened data, component-major Float32Array k × V (SharedArrayBuffer-backed): Z·Zᵀ/V = I. */
  z: Float32Array;
  k: number;
  V: number;
  /** Whitening matrix P (k × T, row-major): z = P·(x − μ1ᵀ). */
  whitening: Float64Array;
  /** De-whitening matrix (T × k, row-major): x − μ1ᵀ ≈ dewhitening·z (the PCA reconstruction). */
  dewhitening: Float64Array;
}

/**
 * Projects centred data onto the k leading eigenvectors and scales each to unit variance:
 * P = D·U_kᵀ with d_i = √(V / ((V − 1) λ_i)), so that (1/V)·Z·Zᵀ = I for covariance
 * C = (X − μ1ᵀ)(X − μ1ᵀ)ᵀ/(V − 1) = U Λ Uᵀ (PCA whitening; Hyvärinen & Oja 2000, Neural
 * Networks 13:411, §5.2). x: time-major Float32Array T × V; vectors: eigenvectors as rows (T × T);
 * eigenvalues descending; mu: spatial mean per time point (length T).
 */
export async function whiten(
  x: Float32Array,
  T: number,
  V: number,
  vectors: Float64Array,
  eigenvalues: Float64Array,
  mu: Float64Array,
  k: number,
  pool: KernelPool,
): Promise<Whitened> {
  const p = new Float64Array(k * T);
  const dw = new Float64Array(T * k);
  const c = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    const d = Math.sqrt(V / ((V - 1) * eigenvalues[i]!));
    let ci = 0;
    for (let t = 0; t < T; t++) {
      const u = vectors[i * T + t]!;
      p[i * T + t] = d * u;
      dw[t * k + i] = u / d;
      ci += d * u * mu[t]!;
    }
    c[i] = ci;
  }
  const z = sharedFloat32(k * V);
  const parts = pool.partition(V);
  await pool.run('projectChunk', parts, (r) => [x, T, V, p, c, k, r[0], r[1], z]);
  return { z, k, V, whitening: p, dewhitening: dw };
}

/** Covariance (1/V)·Z·Zᵀ of component-major k × V data (k × k, row-major); for tests and checks. */
export function whitenedCovariance(z: Float32Array, k: number, V: number): Float64Array {
  const out = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = i; j < k; j++) {
      let s = 0;
      const oi = i * V,
        oj = j * V;
      for (let v = 0; v < V; v++) s += z[oi + v]! * z[oj + v]!;
      out[i * k + j] = s / V;
      out[j * k + i] = s / V;
    }
  }
  return out;
}
