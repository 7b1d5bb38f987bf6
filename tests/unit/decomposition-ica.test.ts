// FastICA, whitening and the Amari index on mixtures of known non-Gaussian sources.
import { afterAll, describe, expect, it } from 'vitest';
import { amariIndex } from '@/lib/decomposition/amari';
import { temporalCovariance } from '@/lib/decomposition/covariance';
import { fastIca, symmetricDecorrelation, type Contrast } from '@/lib/decomposition/fastica';
import { temporalPca } from '@/lib/decomposition/pca';
import { createRng } from '@/lib/random';
import { whiten, whitenedCovariance } from '@/lib/decomposition/whitening';
import { KernelPool, sharedFloat32 } from '@/lib/decomposition/worker-pool';
import { gramChunk } from '@/lib/decomposition/kernels';

const pools: KernelPool[] = [];
function pool(threads: number): KernelPool {
  const p = new KernelPool(threads);
  pools.push(p);
  return p;
}
afterAll(async () => {
  await Promise.all(pools.map((p) => p.close()));
});

/** k sources × V samples: alternately Laplace (super-Gaussian) and uniform (sub-Gaussian), unit variance. */
function sources(k: number, V: number, seed: number): Float64Array {
  const u = createRng(seed, 'direct').next;
  const s = new Float64Array(k * V);
  for (let i = 0; i < k; i++) {
    for (let v = 0; v < V; v++) {
      const r = u();
      s[i * V + v] =
        i % 2 === 0 ? (r < 0.5 ? Math.log(2 * r + 1e-300) : -Math.log(2 - 2 * r + 1e-300)) / Math.SQRT2 : (r - 0.5) * Math.sqrt(12);
    }
  }
  return s;
}

/** x = A·s (+ an offset per row), time-major Float32Array T × V shared; returns A (T × k). */
function mix(s: Float64Array, k: number, V: number, T: number, seed: number): { x: Float32Array; a: Float64Array } {
  const g = createRng(seed, 'direct').gauss;
  const a = new Float64Array(T * k);
  for (let i = 0; i < T * k; i++) a[i] = g();
  const x = sharedFloat32(T * V);
  for (let t = 0; t < T; t++) {
    for (let v = 0; v < V; v++) {
      let acc = 3 + t;
      for (let i = 0; i < k; i++) acc += a[t * k + i]! * s[i * V + v]!;
      x[t * V + v] = acc;
    }
  }
  return { x, a };
}

async function separate(k: number, V: number, contrast: Contrast, threads: number, seed = 5) {
  const s = sources(k, V, 11);
  const { x, a } = mix(s, k, V, k, 12);
  const p = pool(threads);
  const cov = await temporalCovariance(x, k, V, p);
  const pca = temporalPca(cov.cov, k);
  const wh = await whiten(x, k, V, pca.vectors, pca.eigenvalues, cov.spatialMean, k, p);
  const ica = await fastIca(wh.z, k, V, p, { contrast, seed });
  // Global system W·P·A (k × k): a scaled permutation for perfect separation.
  const wp = new Float64Array(k * k);
  for (let i = 0; i < k; i++)
    for (let t = 0; t < k; t++) {
      let acc = 0;
      for (let j = 0; j < k; j++) acc += ica.w[i * k + j]! * wh.whitening[j * k + t]!;
      wp[i * k + t] = acc;
    }
  const g = new Float64Array(k * k);
  for (let i = 0; i < k; i++)
    for (let j = 0; j < k; j++) {
      let acc = 0;
      for (let t = 0; t < k; t++) acc += wp[i * k + t]! * a[t * k + j]!;
      g[i * k + j] = acc;
    }
  return { g, ica, wh };
}

describe('Amari index (Amari, Cichocki & Yang 1996, NIPS 8)', () => {
  it('is 0 for a scaled permutation', () => {
    expect(
      amariIndex([
        [0, 2.5, 0],
        [-0.3, 0, 0],
        [0, 0, 7],
      ]),
    ).toBe(0);
  });
  it('is positive for a mixing matrix and at most 1', () => {
    const v = amariIndex([
      [1, 1],
      [1, -1],
    ]);
    expect(v).toBeCloseTo(1, 12); // every row and column fully mixed: (2·(2/1 − 1))·2 / (2·2·1) = 1
    expect(
      amariIndex([
        [1, 0.1],
        [0.05, 1],
      ]),
    ).toBeCloseTo((0.1 + 0.05 + 0.1 + 0.05) / 4, 12);
  });
});

describe('whitening (covariance of whitened data = identity; a property of the transform)', () => {
  it('‖cov(Z) − I‖max < 1e-5 on a 4-source mixture', async () => {
    const { wh } = await separate(4, 6000, 'logcosh', 1);
    const c = whitenedCovariance(wh.z, 4, 6000);
    let worst = 0;
    for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) worst = Math.max(worst, Math.abs(c[i * 4 + j]! - (i === j ? 1 : 0)));
    expect(worst).toBeLessThan(1e-5);
  });
});

describe('FastICA (Hyvärinen 1999; Hyvärinen & Oja 2000) recovers known Laplace/uniform sources', () => {
  for (const contrast of ['logcosh', 'exp', 'cube'] as const) {
    it(`Amari index of W·A ≤ 0.05 with ${contrast}`, async () => {
      const { g, ica } = await separate(4, 20000, contrast, 2);
      expect(ica.converged).toBe(true);
      expect(amariIndex(g, 4)).toBeLessThanOrEqual(0.05);
    });
  }
  it('gives bit-identical W on 1 thread and in 2 worker threads (fixed partition)', async () => {
    const one = await separate(3, 8000, 'logcosh', 1);
    const two = await separate(3, 8000, 'logcosh', 2);
    expect(pools[pools.length - 1]!.parallel).toBe(true); // really ran on worker threads
    expect(two.ica.iterations).toBe(one.ica.iterations);
    expect(Array.from(two.ica.w)).toEqual(Array.from(one.ica.w));
  });
  it('on non-convergence retries once from its last estimate, then keeps the result flagged (no fresh restarts)', async () => {
    const s = sources(4, 4000, 3);
    const { x } = mix(s, 4, 4000, 4, 4);
    const p = pool(1);
    const cov = await temporalCovariance(x, 4, 4000, p);
    const pca = temporalPca(cov.cov, 4);
    const wh = await whiten(x, 4, 4000, pca.vectors, pca.eigenvalues, cov.spatialMean, 4, p);
    const r = await fastIca(wh.z, 4, 4000, p, { seed: 10, maxIter: 1, tol: 1e-12 });
    expect(r.converged).toBe(false);
    expect(r.attempts).toBe(2);
    expect(r.seed).toBe(10);
    expect(r.iterations).toBe(2);
    // The retry continued from the first attempt's estimate: two single iterations from the seed's start.
    const two = await fastIca(wh.z, 4, 4000, p, { seed: 10, maxIter: 2, tol: 1e-12, retry: false });
    expect(Array.from(r.w)).toEqual(Array.from(two.w));
    const none = await fastIca(wh.z, 4, 4000, p, { seed: 10, maxIter: 1, tol: 1e-12, retry: false });
    expect(none.attempts).toBe(1);
  });
  it('symmetric decorrelation returns an orthogonal matrix', () => {
    const w = symmetricDecorrelation(Float64Array.from([1, 2, 0.5, -1, 3, 1, 0.2, 0.1, 2]), 3);
    for (let i = 0; i < 3; i++)
      for (let j = 0; j < 3; j++) {
        let d = 0;
        for (let l = 0; l < 3; l++) d += w[i * 3 + l]! * w[j * 3 + l]!;
        expect(d).toBeCloseTo(i === j ? 1 : 0, 10);
      }
  });
});

describe('Gram kernel', () => {
  it('matches a naive double loop for T not a multiple of 4, across voxel blocks', () => {
    const T = 7,
      V = 700;
    const u = createRng(9, 'direct').next;
    const x = new Float32Array(T * V).map(() => u() - 0.5);
    const out = new Float64Array(T * T);
    gramChunk(x, T, V, 0, 300, out);
    gramChunk(x, T, V, 300, V, out);
    for (let a = 0; a < T; a++)
      for (let b = a; b < T; b++) {
        let s = 0;
        for (let v = 0; v < V; v++) s += x[a * V + v]! * x[b * V + v]!;
        expect(out[a * T + b]).toBeCloseTo(s, 9);
      }
  });
});

describe('FastICA warm start on a voxel subset', () => {
  it('ends at the same separation as a cold start (Amari ≤ 0.05) and reports its subset', async () => {
    const k = 3,
      V = 30000;
    const s = sources(k, V, 21);
    const { x, a } = mix(s, k, V, k, 22);
    const p = pool(2);
    const cov = await temporalCovariance(x, k, V, p);
    const pca = temporalPca(cov.cov, k);
    const wh = await whiten(x, k, V, pca.vectors, pca.eigenvalues, cov.spatialMean, k, p);
    const r = await fastIca(wh.z, k, V, p, { seed: 3, warmStartVoxels: 5000 });
    expect(r.warmStartVoxels).toBe(5000);
    expect(r.warmStartIterations).toBeGreaterThan(0);
    expect(r.converged).toBe(true);
    const g = new Float64Array(k * k);
    for (let i = 0; i < k; i++)
      for (let j = 0; j < k; j++) {
        let acc = 0;
        for (let t = 0; t < k; t++) {
          let wp = 0;
          for (let l = 0; l < k; l++) wp += r.w[i * k + l]! * wh.whitening[l * k + t]!;
          acc += wp * a[t * k + j]!;
        }
        g[i * k + j] = acc;
      }
    expect(amariIndex(g, k)).toBeLessThanOrEqual(0.05);
    const cold = await fastIca(wh.z, k, V, p, { seed: 3, warmStartVoxels: 0 });
    expect(cold.warmStartVoxels).toBe(0);
    expect(cold.warmStartIterations).toBe(0);
  });
});
