// decomposeRun end to end on small synthetic runs (invented data): determinism, orientation,
// ordering, z-scoring, masks, dropped volumes, bad voxels and errors.
import { describe, expect, it } from 'vitest';
import { decomposeRun } from '@/lib/decomposition/pipeline';
import { DecompositionError } from '@/lib/decomposition/errors';
import { imageFromArray, pearson, syntheticRun } from './decomposition-synthetic';

const run = syntheticRun({ dims: [14, 14, 6], T: 60, k: 4, noise: 0.3, seed: 3 });
const nVox = 14 * 14 * 6;
const fullMask = new Uint8Array(nVox).fill(1);

describe('decomposeRun', () => {
  it('is deterministic: same seed → identical maps and time courses, on 1 or 2 threads', async () => {
    const a = await decomposeRun({ image: run.image, mask: fullMask }, { seed: 42, threads: 1 });
    const b = await decomposeRun({ image: run.image, mask: fullMask }, { seed: 42, threads: 2 });
    expect(a.seed).toBe(42);
    expect(
      Buffer.from(a.maps.buffer, a.maps.byteOffset, a.maps.byteLength).equals(
        Buffer.from(b.maps.buffer, b.maps.byteOffset, b.maps.byteLength),
      ),
    ).toBe(true);
    expect(Array.from(a.timecourses)).toEqual(Array.from(b.timecourses));
  });

  it('recovers each true map (without variance normalisation, so maps keep their shape), orients heavy tails positive, orders by variance, z-scores maps', async () => {
    const r = await decomposeRun({ image: run.image, mask: fullMask }, { components: 4, seed: 1, threads: 1, varianceNorm: false });
    const V = r.voxelsInMask;
    expect(r.k).toBe(4);
    expect(r.converged).toBe(true);
    for (const truth of run.maps) {
      const m = Array.from(r.maskIndices, (i) => truth[i]!);
      let best = 0;
      for (let c = 0; c < r.k; c++) best = Math.max(best, pearson(m, r.maps.subarray(c * V, (c + 1) * V)));
      expect(best).toBeGreaterThan(0.9); // positive: orientation makes the blob the positive tail
    }
    for (let c = 0; c < r.k; c++) {
      const map = r.maps.subarray(c * V, (c + 1) * V);
      let m = 0,
        m2 = 0,
        m3 = 0;
      for (const v of map) m += v;
      m /= V;
      for (const v of map) {
        m2 += (v - m) ** 2;
        m3 += (v - m) ** 3;
      }
      expect(Math.abs(m)).toBeLessThan(1e-4);
      expect(m2 / V).toBeCloseTo(1, 4);
      expect(m3).toBeGreaterThan(0);
      if (c > 0) expect(r.explainedVariance[c]!).toBeLessThanOrEqual(r.explainedVariance[c - 1]!);
    }
    // Time courses reproduce the data: the rank-k reconstruction explains most of the variance.
    let ev = 0;
    for (const e of r.explainedVariance) ev += e;
    expect(ev).toBeGreaterThan(0.3);
    expect(r.pcaVarianceKept).toBeGreaterThan(0.3);
    expect(r.timecourses.length).toBe(r.timepoints * r.k);
  });

  it('drops initial volumes, counts non-finite and constant voxels, uses the TR', async () => {
    const data = run.data.slice();
    data[10 * nVox + 5] = NaN; // voxel 5 at t = 10
    for (let t = 0; t < run.T; t++) data[t * nVox + 9] = 7; // constant voxel 9
    const img = imageFromArray(data, run.dims, run.T, 2.5);
    const stages: string[] = [];
    const r = await decomposeRun({ image: img, mask: fullMask }, { drop: 4, components: 3, threads: 1 }, (s) => stages.push(s));
    expect(r.timepoints).toBe(run.T - 4);
    expect(r.nonFiniteVoxels).toBe(1);
    expect(r.zeroVarianceVoxels).toBe(1);
    expect(r.voxelsInMask).toBe(nVox - 2);
    expect(r.mask[5]).toBe(0);
    expect(r.mask[9]).toBe(0);
    expect(r.timeSeconds[0]).toBeCloseTo(10, 12);
    expect(r.trSeconds).toBe(2.5);
    expect(stages).toContain('ica');
    expect(r.seconds.total).toBeGreaterThan(0);
    expect(Number.isFinite(r.meanImage[5]!)).toBe(true);
  });

  it('variance normalisation and detrend are optional and reported', async () => {
    const r = await decomposeRun({ image: run.image, mask: fullMask }, { varianceNorm: false, detrend: true, components: 3, threads: 1 });
    expect(r.varianceNormalised).toBe(false);
    expect(r.detrended).toBe(true);
    expect(r.k).toBe(3);
  });

  it('estimates the dimension from the data (laplace, aic, mdl, variance)', async () => {
    for (const dimMethod of ['laplace', 'mdl', 'aic', { variance: 0.5 }] as const) {
      const r = await decomposeRun({ image: run.image, mask: fullMask }, { dimMethod, threads: 1 });
      expect(r.k).toBeGreaterThanOrEqual(2);
      expect(r.dimension.effectiveSamples).toBeLessThanOrEqual(r.voxelsInMask);
      if (dimMethod === 'laplace' || dimMethod === 'mdl') expect(r.k).toBe(4); // 4 true sources
    }
  });

  it('rejects short runs, wrong-size masks and empty masks with typed errors', async () => {
    await expect(decomposeRun({ image: run.image, mask: fullMask }, { drop: 55 })).rejects.toThrow(/at least 10 are needed/);
    await expect(decomposeRun({ image: run.image, mask: new Uint8Array(10) })).rejects.toBeInstanceOf(DecompositionError);
    await expect(decomposeRun({ image: run.image, mask: new Uint8Array(nVox) })).rejects.toThrow(/mask is empty/);
  });
});
