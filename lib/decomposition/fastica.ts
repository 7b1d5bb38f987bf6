// Spatial FastICA, symmetric approach, on whitened k × V data.
import { symmetricEigen } from './eigen-symmetric';
import { DecompositionError } from './errors';
import { createRng } from '@/lib/random';
import { KernelPool, sharedFloat32, sharedFloat64 } from './worker-pool';

export type Contrast = 'logcosh' | 'exp' | 'cube';
const CONTRAST_CODE: Record<Contrast, number> = { logcosh: 0, exp: 1, cube: 2 };

export interface FastIcaOptions {
  contrast?: Contrast;
  /** log-cosh constant α (1 ≤ α ≤ 2; Hyvärinen 1999). Default 1. */
  alpha?: number;
  /** Convergence tolerance on max_i |1 − |⟨w_i, w_i_old⟩||. Default 1e-4 (scikit-learn 1.2.1's default). */
  tol?: number;
  /** Iteration cap per attempt. Default 200 (scikit-learn 1.2.1's default). */
  maxIter?: number;
  seed?: number;
  /**
   * Non-convergence policy: when the first attempt reaches maxIter, one retry continues from its
   * last (best) estimate for up to maxIter more iterations; if that does not converge either, the
   * result is kept and flagged (converged: false). Default true; false = no retry.
   */
  retry?: boolean;
  /** Start from this unmixing matrix (k × k, row-major; decorrelated first) instead of a seeded random one. */
  init?: Float64Array;
  /**
   * Size of the voxel subset for a warm start: when V > 2 × this, FastICA first converges on every
   * ⌊V / this⌋-th voxel, then continues on all voxels from that W (the result is still a fixed
   * point on the full data; only the path there is cheaper). 0 = off. Default 32768.
   */
  warmStartVoxels?: number;
  /**
   * Called after every fixed-point iteration (warm start, full data and retry alike) with the
   * iteration count so far and the convergence measure max_i |1 − |⟨w_i, w_i_old⟩|| (it reaches
   * `tol` at convergence). For progress reports only; never changes the result.
   */
  onIteration?: (iteration: number, change: number) => void;
}

export interface FastIcaResult {
  /** Unmixing matrix W (k × k, row-major, orthogonal): s = W·z. */
  w: Float64Array;
  /** Iterations on the full data, both attempts together. */
  iterations: number;
  /** Iterations of the warm start on the voxel subset (0 when none ran). */
  warmStartIterations: number;
  /** Voxels in the warm-start subset (0 when none ran). */
  warmStartVoxels: number;
  converged: boolean;
  /** Seed of the random start (the requested one; unused when init was given). */
  seed: number;
  /** 1, or 2 when the warm-started retry ran (see FastIcaOptions.retry). */
  attempts: number;
}

/**
 * Symmetric decorrelation W ← (W Wᵀ)^{−1/2} W (Hyvärinen & Oja 2000, Neural Networks 13:411,
 * eq. 45), via the eigen-decomposition of the k × k matrix W Wᵀ (eigen-symmetric.ts). w: row-major k × k.
 */
export function symmetricDecorrelation(w: Float64Array, k: number): Float64Array {
  const m = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = i; j < k; j++) {
      let s = 0;
      const oi = i * k,
        oj = j * k;
      for (let l = 0; l < k; l++) s += w[oi + l]! * w[oj + l]!;
      m[i * k + j] = s;
      m[j * k + i] = s;
    }
  }
  const { values, vectors } = symmetricEigen(m, k);
  // R = U diag(1/√d) Uᵀ = Σ_l (u_l d_l^{−1/4})(u_l d_l^{−1/4})ᵀ; eigenvectors are rows of `vectors`.
  const r = new Float64Array(k * k);
  const u = new Float64Array(k);
  for (let l = 0; l < k; l++) {
    const sc = 1 / Math.sqrt(Math.sqrt(Math.max(values[l]!, 1e-300)));
    for (let i = 0; i < k; i++) u[i] = vectors[l * k + i]! * sc;
    for (let i = 0; i < k; i++) {
      const ui = u[i]!,
        o = i * k;
      for (let j = i; j < k; j++) r[o + j] += ui * u[j]!;
    }
  }
  for (let i = 0; i < k; i++) for (let j = 0; j < i; j++) r[i * k + j] = r[j * k + i]!;
  const out = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    const o = i * k;
    for (let l = 0; l < k; l++) {
      const ril = r[o + l]!,
        ol = l * k;
      for (let j = 0; j < k; j++) out[o + j] += ril * w[ol + j]!;
    }
  }
  return out;
}

/**
 * FastICA with symmetric decorrelation (Hyvärinen 1999, IEEE TNN 10:626, fixed-point rule eq. 20;
 * Hyvärinen & Oja 2000): W⁺ = E{g(Wz) zᵀ} − diag(E{g'(Wz)}) W, then W ← (W⁺W⁺ᵀ)^{−1/2} W⁺, until
 * max_i |1 − |⟨w⁺_i, w_i⟩|| < tol (scikit-learn 1.2.1's stopping rule). Samples are voxels (spatial
 * ICA). z: whitened Float32Array k × V (SharedArrayBuffer-backed for parallel runs). Starts from a
 * seeded Gaussian W or opts.init (warm-started on a voxel subset for large V); when the attempt does
 * not converge, retries once from its last estimate, then returns the result flagged (never a
 * silent fresh restart).
 */
export async function fastIca(z: Float32Array, k: number, V: number, pool: KernelPool, opts: FastIcaOptions = {}): Promise<FastIcaResult> {
  const contrast = opts.contrast ?? 'logcosh';
  const code = CONTRAST_CODE[contrast];
  if (code === undefined) throw new DecompositionError('bad_option', `Unknown contrast "${String(contrast)}"; use logcosh, exp or cube.`);
  const alpha = opts.alpha ?? 1;
  const tol = opts.tol ?? 1e-4;
  const maxIter = opts.maxIter ?? 200;
  const seed = (opts.seed ?? 1) >>> 0;
  const retry = opts.retry ?? true;
  if (opts.init && opts.init.length !== k * k)
    throw new DecompositionError('bad_option', `init must hold k × k = ${k * k} values; got ${opts.init.length}.`);
  if (!(tol > 0)) throw new DecompositionError('bad_option', `tol must be positive; got ${tol}.`);
  if (!(Number.isInteger(maxIter) && maxIter >= 1))
    throw new DecompositionError('bad_option', `maxIter must be a positive integer; got ${maxIter}.`);

  const warm = opts.warmStartVoxels ?? 32768;
  // Warm start on an evenly strided voxel subset when the data are much larger than it.
  const stride = warm > 0 && V > 2 * warm ? Math.floor(V / warm) : 1;
  let zSub: Float32Array | null = null;
  let Vs = V;
  if (stride > 1) {
    Vs = Math.ceil(V / stride);
    zSub = sharedFloat32(k * Vs);
    for (let i = 0; i < k; i++) {
      const src = i * V,
        dst = i * Vs;
      for (let q = 0; q < Vs; q++) zSub[dst + q] = z[src + q * stride]!;
    }
  }
  let w: Float64Array;
  if (opts.init) {
    w = symmetricDecorrelation(opts.init, k);
  } else {
    const rnd = createRng(seed, 'direct').gauss; // 'direct': a stored decomposition's seed reproduces it
    w = new Float64Array(k * k);
    for (let i = 0; i < k * k; i++) w[i] = rnd();
    w = symmetricDecorrelation(w, k);
  }
  let warmIterations = 0;
  let done = 0;
  const report = opts.onIteration ? (it: number, change: number) => opts.onIteration!(done + it, change) : undefined;
  if (zSub) {
    const pre = await iterateFastIca(zSub, k, Vs, pool, w, code, alpha, tol, maxIter, report);
    done += pre.iterations;
    w = pre.w;
    warmIterations = pre.iterations;
  }
  let full = await iterateFastIca(z, k, V, pool, w, code, alpha, tol, maxIter, report);
  done += full.iterations;
  let iterations = full.iterations;
  let attempts = 1;
  if (!full.converged && retry) {
    full = await iterateFastIca(z, k, V, pool, full.w, code, alpha, tol, maxIter, report);
    iterations += full.iterations;
    attempts = 2;
  }
  return {
    w: full.w,
    iterations,
    warmStartIterations: warmIterations,
    warmStartVoxels: zSub ? Vs : 0,
    converged: full.converged,
    seed,
    attempts,
  };
}

let iterationRuns = 0;

/** Fixed-point iterations from w until convergence or maxIter (see fastIca). */
async function iterateFastIca(
  z: Float32Array,
  k: number,
  V: number,
  pool: KernelPool,
  w0: Float64Array,
  code: number,
  alpha: number,
  tol: number,
  maxIter: number,
  onIteration?: (iteration: number, change: number) => void,
): Promise<{ w: Float64Array; iterations: number; converged: boolean }> {
  const parts = pool.partition(V);
  const Gs = parts.map(() => sharedFloat64(k * k));
  const gps = parts.map(() => sharedFloat64(k));
  // z is constant during these iterations: the WebAssembly kernels keep their copy of each range.
  const cacheKey = `fastica-${++iterationRuns}`;
  let w = w0;
  let it = 0;
  while (it < maxIter) {
    it++;
    for (const g of Gs) g.fill(0);
    for (const g of gps) g.fill(0);
    const wShared = sharedFloat64(k * k);
    wShared.set(w);
    await pool.run('icaChunk', parts, (r, i) => [z, k, V, wShared, code, alpha, r[0], r[1], Gs[i], gps[i], cacheKey]);
    const w1 = new Float64Array(k * k);
    for (let q = 0; q < parts.length; q++) {
      const G = Gs[q]!;
      for (let e = 0; e < k * k; e++) w1[e] += G[e]!;
    }
    for (let i = 0; i < k; i++) {
      let gpi = 0;
      for (let q = 0; q < parts.length; q++) gpi += gps[q]![i]!;
      gpi /= V;
      for (let j = 0; j < k; j++) w1[i * k + j] = w1[i * k + j]! / V - gpi * w[i * k + j]!;
    }
    const wn = symmetricDecorrelation(w1, k);
    let lim = 0;
    for (let i = 0; i < k; i++) {
      let d = 0;
      for (let j = 0; j < k; j++) d += wn[i * k + j]! * w[i * k + j]!;
      lim = Math.max(lim, Math.abs(Math.abs(d) - 1));
    }
    w = wn;
    onIteration?.(it, lim);
    if (lim < tol) return { w, iterations: it, converged: true };
  }
  return { w, iterations: it, converged: false };
}
