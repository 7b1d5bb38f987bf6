// Temporal (T × T) covariance of the voxel × time data, computed across worker threads.
import { KernelPool, sharedFloat64 } from './worker-pool';

export interface TemporalCovariance {
  /** T × T covariance, row-major Float64Array: C[a,b] = Σ_v (x[a,v] − μ_a)(x[b,v] − μ_b) / (V − 1). */
  cov: Float64Array;
  /** Spatial mean of each time point, μ_t = Σ_v x[t,v] / V (length T). */
  spatialMean: Float64Array;
  /** Σ_v Σ_t (x[t,v] − μ_t)², the total centred sum of squares (= trace(C)·(V − 1)). */
  totalSumSquares: number;
}

/**
 * Covariance between time points with voxels as samples (the spatial-ICA convention: each time
 * point is centred over voxels, as scikit-learn's PCA/FastICA centre features over samples), via the
 * Gram matrix XXᵀ − V·μμᵀ. Never forms a V × V matrix.
 * x: time-major Float32Array T × V (SharedArrayBuffer-backed for parallel runs). Units: data units².
 */
export async function temporalCovariance(x: Float32Array, T: number, V: number, pool: KernelPool): Promise<TemporalCovariance> {
  const parts = pool.partition(V);
  const outs = parts.map(() => sharedFloat64(T * T));
  await pool.run('gramChunk', parts, (r, i) => [x, T, V, r[0], r[1], outs[i]]);
  const gram = new Float64Array(T * T);
  for (const o of outs) for (let a = 0; a < T; a++) for (let b = a; b < T; b++) gram[a * T + b] += o[a * T + b]!;

  const mu = new Float64Array(T);
  for (let t = 0; t < T; t++) {
    let s = 0;
    const off = t * V;
    for (let v = 0; v < V; v++) s += x[off + v]!;
    mu[t] = s / V;
  }
  const cov = new Float64Array(T * T);
  const denom = Math.max(1, V - 1);
  let total = 0;
  for (let a = 0; a < T; a++) {
    for (let b = a; b < T; b++) {
      const c = (gram[a * T + b]! - V * mu[a]! * mu[b]!) / denom;
      cov[a * T + b] = c;
      cov[b * T + a] = c;
    }
    total += cov[a * T + a]! * denom;
  }
  return { cov, spatialMean: mu, totalSumSquares: total };
}
