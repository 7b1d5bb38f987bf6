// Spatial smoothness estimate behind the effective sample count of the dimensionality estimate.
import { describe, expect, it } from 'vitest';
import { estimateSmoothness } from '@/lib/decomposition/smoothness';
import { createRng } from '@/lib/random';

/** White noise volumes smoothed by a separable sampled Gaussian of SD sigma voxels (x fastest). */
function smoothNoise(n: number, T: number, sigma: number, seed: number): Float32Array {
  const g = createRng(seed, 'direct').gauss;
  const r = Math.ceil(4 * sigma);
  const kern = Array.from({ length: 2 * r + 1 }, (_, i) => Math.exp(-((i - r) ** 2) / (2 * sigma * sigma)));
  const nv = n * n * n;
  const x = new Float32Array(T * nv);
  const a = new Float64Array(nv),
    b = new Float64Array(nv);
  const strides = [1, n, n * n];
  for (let t = 0; t < T; t++) {
    for (let i = 0; i < nv; i++) a[i] = g();
    let src = a,
      dst = b;
    for (const s of strides) {
      for (let i = 0; i < nv; i++) {
        const c = Math.floor(i / s) % n;
        let acc = 0;
        for (let k = -r; k <= r; k++) {
          const cc = (c + k + n) % n; // periodic boundary keeps the noise stationary
          acc += kern[k + r]! * src[i + (cc - c) * s]!;
        }
        dst[i] = acc;
      }
      [src, dst] = [dst, src];
    }
    for (let i = 0; i < nv; i++) x[t * nv + i] = src[i]!;
  }
  return x;
}

describe('estimateSmoothness', () => {
  it('recovers FWHM = σ·√(8 ln 2) of Gaussian-smoothed white noise within 10 % (lag-1 autocorrelation, Forman et al. 1995, from memory)', () => {
    const n = 24,
      T = 6,
      sigma = 1.5;
    const x = smoothNoise(n, T, sigma, 4);
    const V = n * n * n;
    const idx = Int32Array.from({ length: V }, (_, i) => i);
    const est = estimateSmoothness(x, T, V, idx, [n, n, n]);
    const expected = sigma * Math.sqrt(8 * Math.LN2);
    for (const f of est.fwhmVoxels) expect(Math.abs(f - expected) / expected).toBeLessThan(0.1);
    expect(est.effectiveSamples).toBeCloseTo(V / (est.fwhmVoxels[0] * est.fwhmVoxels[1] * est.fwhmVoxels[2]), 6);
  });
  it('gives FWHM 1 and V effective samples for white noise', () => {
    const n = 16,
      T = 4;
    const g = createRng(2, 'direct').gauss;
    const V = n * n * n;
    const x = Float32Array.from({ length: T * V }, () => g());
    const est = estimateSmoothness(
      x,
      T,
      V,
      Int32Array.from({ length: V }, (_, i) => i),
      [n, n, n],
    );
    expect(est.fwhmVoxels).toEqual([1, 1, 1]);
    expect(est.effectiveSamples).toBe(V);
  });
});
