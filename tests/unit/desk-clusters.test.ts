import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { findClusters, maxAbs } from '@/lib/desk/clusters';

type Fixture = {
  source: string;
  dims: [number, number, number];
  threshold: number;
  values: number[];
  clusters: { size: number; peak: number[]; peakZ: number }[];
  maxAbs: number;
};
const fx = JSON.parse(readFileSync('tests/fixtures/desk/clusters.json', 'utf8')) as Fixture;
const values = Float32Array.from(fx.values);
const at = (i: number) => values[i];

describe('findClusters', () => {
  // reference: scipy ndimage.label with 26-connectivity (scripts/reference/make-cluster-fixtures.py)
  it('finds the same clusters, sizes and peaks as scipy.ndimage.label (26-connectivity)', () => {
    const got = findClusters(at, fx.dims, fx.threshold);
    expect(got.map((c) => c.size)).toEqual(fx.clusters.map((c) => c.size));
    got.forEach((c, i) => {
      expect(c.peak).toEqual(fx.clusters[i].peak);
      expect(c.peakZ).toBeCloseTo(fx.clusters[i].peakZ, 5);
    });
  });

  it('keeps only the requested sign', () => {
    const pos = findClusters(at, fx.dims, fx.threshold, { sign: 'positive' });
    const neg = findClusters(at, fx.dims, fx.threshold, { sign: 'negative' });
    expect(pos.every((c) => c.peakZ > 0)).toBe(true);
    expect(neg.every((c) => c.peakZ < 0)).toBe(true);
    expect(pos.length + neg.length).toBe(fx.clusters.length);
  });

  it('never joins a positive and a negative voxel, and joins corner neighbours', () => {
    // 3×3×1: +3 at (0,0), −3 at (1,0), +3 at (2,1); (2,1) is a corner neighbour of (1,0) only, which has the other sign
    const v = [3, -3, 0, 0, 0, 3, 0, 0, 0];
    const c = findClusters((i) => v[i], [3, 3, 1], 2);
    expect(c.map((x) => [x.size, Math.sign(x.peakZ)])).toEqual([
      [1, 1],
      [1, -1],
      [1, 1],
    ]);
    const w = [3, 0, 0, 0, 3, 0, 0, 0, 3]; // a diagonal line: one cluster through corners
    expect(findClusters((i) => w[i], [3, 3, 1], 2).map((x) => x.size)).toEqual([3]);
  });

  it('returns nothing above an unreached threshold, and maxAbs is the largest |z|', () => {
    expect(findClusters(at, fx.dims, 99)).toEqual([]);
    expect(maxAbs(at, values.length)).toBeCloseTo(fx.maxAbs, 5);
    expect(maxAbs(() => Number.NaN, 4)).toBeNull();
  });
});
