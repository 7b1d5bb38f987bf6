// PCA dimensionality: Minka's Laplace evidence, Wax & Kailath AIC/MDL, variance fraction, clamps.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  chooseDimension,
  informationCriterionDimension,
  logGamma,
  minkaDimension,
  minkaLogEvidence,
  varianceFractionDimension,
} from '@/lib/decomposition/dimensionality';
import { temporalCovariance } from '@/lib/decomposition/covariance';
import { temporalPca } from '@/lib/decomposition/pca';
import { createRng } from '@/lib/random';
import { KernelPool, sharedFloat32 } from '@/lib/decomposition/worker-pool';

interface MinkaFixture {
  library: string;
  datasets: Array<{
    name: string;
    nSamples: number;
    nFeatures: number;
    mleComponents: number;
    explainedVariance: number[];
    data?: number[][];
  }>;
}
// Fixture: scikit-learn 1.2.1 PCA(n_components='mle'), written by scripts/reference/make-decomposition-fixtures.py.
const fixture = JSON.parse(readFileSync('tests/fixtures/decomposition/minka-mle.json', 'utf8')) as MinkaFixture;

/** Eigenvalues of the sample covariance of k strong Gaussian sources + unit white noise in p dims, n samples. */
async function knownRankSpectrum(p: number, k: number, n: number, seed: number): Promise<Float64Array> {
  const g = createRng(seed, 'direct').gauss;
  const load = Array.from({ length: k }, () => Float64Array.from({ length: p }, () => 3 * g()));
  const x = sharedFloat32(p * n);
  for (let v = 0; v < n; v++) {
    const f = Array.from({ length: k }, () => g());
    for (let t = 0; t < p; t++) {
      let acc = g();
      for (let i = 0; i < k; i++) acc += f[i]! * load[i]![t]!;
      x[t * n + v] = acc;
    }
  }
  const pool = new KernelPool(1);
  const cov = await temporalCovariance(x, p, n, pool);
  await pool.close();
  return temporalPca(cov.cov, p).eigenvalues;
}

describe('logGamma (Lanczos)', () => {
  it('matches Γ(5) = 24, Γ(1/2) = √π, Γ(10.5) (exact values, common practice, no source)', () => {
    expect(logGamma(5)).toBeCloseTo(Math.log(24), 12);
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 12);
    // Γ(10.5) = (19!!/2^10)·√π = 1133278.3889487856 (from the double-factorial identity)
    expect(logGamma(10.5)).toBeCloseTo(Math.log(1133278.3889487856), 10);
  });
});

describe('spectra of known rank (k strong sources + white noise)', () => {
  for (const [p, k] of [
    [20, 3],
    [40, 6],
  ] as const) {
    it(`laplace (Minka 2000) and MDL (Wax & Kailath 1985) find k = ${k} of ${p}`, async () => {
      const n = 2000;
      const s = await knownRankSpectrum(p, k, n, 100 + k);
      expect(minkaDimension(s, n)).toBe(k);
      expect(informationCriterionDimension(s, n, 'mdl')).toBe(k);
      // AIC is known to overestimate at large n (Wax & Kailath 1985, §IV) — only a lower bound here.
      expect(informationCriterionDimension(s, n, 'aic')).toBeGreaterThanOrEqual(k);
    });
  }
});

describe(`Minka agreement with ${fixture.library} PCA(n_components='mle')`, () => {
  for (const d of fixture.datasets) {
    it(`${d.name}: the plain estimator picks sklearn's ${d.mleComponents}`, () => {
      expect(minkaDimension(d.explainedVariance, d.nSamples)).toBe(d.mleComponents);
    });
  }
  it('our covariance + eigen-decomposition reproduces sklearn explained_variance_ (relative 1e-6)', async () => {
    const d = fixture.datasets.find((x) => x.data)!;
    const n = d.nSamples,
      p = d.nFeatures;
    // Our layout is time-major: features (time points) × samples (voxels). The Float32 storage
    // rounds the fixture's float64 values (~6e-8 relative), hence the 1e-6 tolerance.
    const x = sharedFloat32(p * n);
    d.data!.forEach((row, v) => row.forEach((val, t) => (x[t * n + v] = val)));
    const pool = new KernelPool(1);
    const cov = await temporalCovariance(x, p, n, pool);
    await pool.close();
    const ev = temporalPca(cov.cov, p).eigenvalues;
    for (let i = 0; i < p; i++) expect(Math.abs(ev[i]! - d.explainedVariance[i]!) / d.explainedVariance[0]!).toBeLessThan(1e-6);
  });
  it('rejects ranks outside [1, p − 1] like sklearn', () => {
    expect(() => minkaLogEvidence([3, 2, 1], 3, 10)).toThrow(/rank/);
  });
});

describe('chooseDimension', () => {
  const s = Float64Array.from({ length: 40 }, (_, i) => (i < 5 ? 50 - i : 1 + 0.001 * (40 - i)));
  it('variance fraction: smallest k reaching the fraction', () => {
    expect(varianceFractionDimension([4, 3, 2, 1], 0.7)).toBe(2);
    expect(varianceFractionDimension([4, 3, 2, 1], 0.75)).toBe(3);
    expect(varianceFractionDimension([4, 3, 2, 1], 0.4)).toBe(1);
    expect(chooseDimension(s, { components: 'auto', method: { variance: 0.5 }, effectiveSamples: 1000 }).method).toBe('variance:0.5');
  });
  it('clamps automatic choices to [2, min(⌊T/3⌋, 100)], reports the raw estimate and flags the bound', () => {
    const c = chooseDimension(s, { components: 'auto', method: { variance: 1 }, effectiveSamples: 1000 });
    expect(c.estimated).toBe(40);
    expect(c.k).toBe(13);
    expect(c.range).toEqual([2, 13]);
    expect(c.atBound).toBe(true);
    const long = Float64Array.from({ length: 600 }, (_, i) => 600 - i);
    expect(chooseDimension(long, { components: 'auto', method: { variance: 1 }, effectiveSamples: 1e5 }).range).toEqual([2, 100]);
    const inside = chooseDimension(s, { components: 'auto', method: 'mdl', effectiveSamples: 1000 });
    expect(inside).toMatchObject({ k: 5, atBound: false });
    expect(inside.estimates).toMatchObject({ aic: 5, mdl: 5 });
    expect(inside.curve).toHaveLength(14);
  });
  it("iid-aic / iid-mdl judge the subsample's own spectrum with its voxel count", () => {
    const c = chooseDimension(s, { components: 'auto', method: 'iid-mdl', effectiveSamples: 1000, iid: { spectrum: s, samples: 800 } });
    expect(c).toMatchObject({ k: 5, method: 'iid-mdl', iidSamples: 800 });
    expect(() => chooseDimension(s, { components: 'auto', method: 'iid-mdl', effectiveSamples: 1000 })).toThrow(
      /needs the i.i.d. voxel subsample/,
    );
  });
  it('fixed numbers pass through; out of range is a typed error', () => {
    expect(chooseDimension(s, { components: 7, method: 'laplace', effectiveSamples: 1000 })).toMatchObject({ k: 7, method: 'fixed' });
    expect(() => chooseDimension(s, { components: 41, method: 'laplace', effectiveSamples: 1000 })).toThrow(/components must be/);
  });
  it('laplace on a sampled 5-source spectrum gives 5 and reports its samples', async () => {
    const sampled = await knownRankSpectrum(40, 5, 1500, 77);
    const c = chooseDimension(sampled, { components: 'auto', method: 'laplace', effectiveSamples: 1500 });
    expect(c).toMatchObject({ k: 5, method: 'laplace', effectiveSamples: 1500 });
  });
});
