// Clustering of restart estimates (Himberg, Hyvärinen & Esposito 2004, NeuroImage 22:1214) and the
// entropy-rate-guided subsampling depth (Li, Adali & Calhoun 2007, Human Brain Mapping 28:1251).
import { describe, expect, it } from 'vitest';
import { symmetricDecorrelation } from '@/lib/decomposition/fastica';
import { iidSubsampling } from '@/lib/decomposition/iid-subsampling';
import { createRng } from '@/lib/random';
import { clusterEstimates, matchToCentrotypes } from '@/lib/decomposition/reproducibility';
import { gaussianKernel, smoothSeparable } from '@/lib/phantom';

function randomOrthogonal(k: number, seed: number): Float64Array {
  const g = createRng(seed, 'direct').gauss;
  return symmetricDecorrelation(
    Float64Array.from({ length: k * k }, () => g()),
    k,
  );
}

/** Rows of w permuted by perm and sign-flipped where flip is set (what another restart returns for the same sources). */
function permuted(w: Float64Array, k: number, perm: number[], flip: boolean[]): Float64Array {
  const out = new Float64Array(k * k);
  perm.forEach((src, dst) => {
    for (let l = 0; l < k; l++) out[dst * k + l] = (flip[dst] ? -1 : 1) * w[src * k + l]!;
  });
  return out;
}

describe('clusterEstimates', () => {
  it('restarts that find the same sources (any order and sign) give index 1 and clusters of R', () => {
    const k = 6;
    const w = randomOrthogonal(k, 1);
    const runs = [
      w,
      permuted(w, k, [5, 4, 3, 2, 1, 0], [true, false, true, false, false, false]),
      permuted(w, k, [1, 0, 3, 2, 5, 4], [false, false, false, true, true, false]),
    ];
    const c = clusterEstimates(runs, k);
    expect(Array.from(c.sizes)).toEqual([3, 3, 3, 3, 3, 3]);
    // intra = 1, extra = mean |w_a·w_b| over different sources = 0 (orthogonal): I_q = 1.
    for (const v of c.index) expect(v).toBeCloseTo(1, 10);
    const m = matchToCentrotypes(w, c.centrotypes, k);
    for (const s of m.similarity) expect(s).toBeCloseTo(1, 10);
    expect(new Set(m.cluster).size).toBe(k);
  });

  it('a component each restart puts somewhere else scores low; the shared ones stay high', () => {
    const k = 4;
    const base = randomOrthogonal(k, 2);
    // Restarts share rows 0–1 exactly; rows 2–3 span the same plane but are rotated differently each time.
    const runs = [0, 0.5, 1.0, 1.5, 2.0].map((angle) => {
      const w = Float64Array.from(base);
      const c = Math.cos(angle),
        s = Math.sin(angle);
      for (let l = 0; l < k; l++) {
        w[2 * k + l] = c * base[2 * k + l]! + s * base[3 * k + l]!;
        w[3 * k + l] = -s * base[2 * k + l]! + c * base[3 * k + l]!;
      }
      return w;
    });
    const c = clusterEstimates(runs, k);
    const m = matchToCentrotypes(base, c.centrotypes, k);
    expect(c.index[m.cluster[0]!]).toBeCloseTo(1 - c.extra[m.cluster[0]!]!, 10);
    expect(c.index[m.cluster[0]!]).toBeGreaterThan(0.9);
    expect(c.index[m.cluster[1]!]).toBeGreaterThan(0.9);
    // The rotating pair: members agree only partly, so the index is well below the shared rows'.
    const low = Array.from(c.index)
      .sort((a, b) => a - b)
      .slice(0, 2);
    for (const v of low) expect(v).toBeLessThan(0.75);
  });
});

describe('iidSubsampling', () => {
  it('picks depth 3 for noise smoothed by a Gaussian of SD 1 voxel (ρ(s) = exp(−s²/4): 0.78, 0.37, 0.11)', () => {
    // Lag-s correlation of white noise smoothed by a Gaussian of SD σ is exp(−s²/(4σ²)) (common
    // practice, no source); the entropy deficit −½ ln(1 − ρ²) first drops below 0.01 nats at s = 3.
    const dims: [number, number, number] = [40, 40, 24];
    const n = dims[0] * dims[1] * dims[2];
    const T = 12;
    const g = createRng(5, 'direct').gauss;
    const kernel = gaussianKernel(1);
    const x = new Float32Array(T * n);
    for (let t = 0; t < T; t++) {
      const vol = x.subarray(t * n, (t + 1) * n);
      for (let i = 0; i < n; i++) vol[i] = g();
      smoothSeparable(vol, dims, kernel);
    }
    const maskIndices = Int32Array.from({ length: n }, (_, i) => i);
    const s = iidSubsampling(x, T, n, maskIndices, dims, 100);
    expect(s.depth).toEqual([3, 3, 3]);
    for (const r of s.lagCorrelation) expect(r).toBeCloseTo(Math.exp(-9 / 4), 1);
    expect(s.voxels.length).toBeGreaterThan(n / 27 - 200);
    expect(s.limitedBySamples).toBe(false);
  });
});
