import { describe, expect, it } from 'vitest';
import { autoBrainMask, BrainMaskError, percentileSorted } from '@/lib/decomposition/brain-mask';
import { ConnectedComponentsError, labelComponents } from '@/lib/decomposition/connected-components';

type Dims = [number, number, number];
const idx = (d: Dims, x: number, y: number, z: number): number => x + d[0] * (y + d[1] * z);

/** Small deterministic normal generator (LCG + Box–Muller) so the tests need no dependency. */
function normalRng(seed: number): () => number {
  let s = seed;
  const u = (): number => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return (s + 0.5) / 2147483648;
  };
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}

describe('labelComponents (hand-built volumes; 6/26-connectivity as in standard digital topology, common practice, no source)', () => {
  it('two separate blobs give two labels with the right sizes', () => {
    const d: Dims = [6, 5, 4];
    const m = new Uint8Array(120);
    // blob A: 2×2×2 cube at the origin (8 voxels); blob B: a 3-voxel bar at x=5, y=4
    for (const [x, y, z] of [
      [0, 0, 0],
      [1, 0, 0],
      [0, 1, 0],
      [1, 1, 0],
      [0, 0, 1],
      [1, 0, 1],
      [0, 1, 1],
      [1, 1, 1],
    ])
      m[idx(d, x, y, z)] = 1;
    for (const z of [1, 2, 3]) m[idx(d, 5, 4, z)] = 1;
    for (const conn of [6, 26] as const) {
      const { labels, sizes } = labelComponents(m, d, conn);
      expect(sizes).toEqual([8, 3]);
      expect(labels[idx(d, 1, 1, 1)]).toBe(1);
      expect(labels[idx(d, 5, 4, 3)]).toBe(2);
      expect(labels[idx(d, 3, 3, 3)]).toBe(0);
    }
  });

  it('voxels touching only along an edge or a corner are separate under 6, joined under 26', () => {
    const d: Dims = [3, 3, 3];
    const edge = new Uint8Array(27);
    edge[idx(d, 0, 0, 0)] = 1;
    edge[idx(d, 1, 1, 0)] = 1; // edge contact
    expect(labelComponents(edge, d, 6).sizes).toEqual([1, 1]);
    expect(labelComponents(edge, d, 26).sizes).toEqual([2]);
    const corner = new Uint8Array(27);
    corner[idx(d, 0, 0, 0)] = 1;
    corner[idx(d, 1, 1, 1)] = 1;
    corner[idx(d, 2, 2, 2)] = 1; // a corner-only diagonal chain
    expect(labelComponents(corner, d, 6).sizes).toEqual([1, 1, 1]);
    expect(labelComponents(corner, d, 26).sizes).toEqual([3]);
  });

  it('does not wrap around the x border of the linear index', () => {
    const d: Dims = [4, 2, 1];
    const m = new Uint8Array(8);
    m[idx(d, 3, 0, 0)] = 1; // linear 3
    m[idx(d, 0, 1, 0)] = 1; // linear 4: adjacent in memory, not in space
    expect(labelComponents(m, d, 26).sizes).toEqual([1, 1]);
  });

  it('refuses a mask of the wrong size and bad dims', () => {
    expect(() => labelComponents(new Uint8Array(5), [2, 2, 2])).toThrow(ConnectedComponentsError);
    expect(() => labelComponents(new Uint8Array(0), [0, 2, 2])).toThrow(/three positive integers/);
  });
});

describe('autoBrainMask on a synthetic head', () => {
  const d: Dims = [40, 44, 30];
  const n = d[0] * d[1] * d[2];
  const truth = new Uint8Array(n);
  const mean = new Float32Array(n);
  const rnd = normalRng(7);
  for (let z = 0; z < d[2]; z++) {
    for (let y = 0; y < d[1]; y++) {
      for (let x = 0; x < d[0]; x++) {
        const i = idx(d, x, y, z);
        const e = ((x - 20) / 13) ** 2 + ((y - 22) / 16) ** 2 + ((z - 15) / 10) ** 2;
        const blob = (x - 3) ** 2 + (y - 3) ** 2 + (z - 3) ** 2 <= 4; // detached, brighter than brain
        const hole = (x - 20) ** 2 + (y - 22) ** 2 + (z - 15) ** 2 <= 4; // dark interior patch
        if (e <= 1) {
          truth[i] = 1;
          mean[i] = hole ? 60 + 10 * rnd() : 1000 + 60 * rnd();
        } else if (blob) {
          mean[i] = 1600 + 50 * rnd();
        } else {
          mean[i] = Math.abs(40 + 20 * rnd());
        }
      }
    }
  }

  it('recovers the ellipsoid (Dice > 0.95), excludes the detached blob, fills the hole', () => {
    const mask = autoBrainMask(mean, d);
    let inter = 0;
    let a = 0;
    let b = 0;
    for (let i = 0; i < n; i++) {
      inter += mask[i] & truth[i];
      a += mask[i];
      b += truth[i];
    }
    const dice = (2 * inter) / (a + b);
    expect(dice).toBeGreaterThan(0.95);
    expect(mask[idx(d, 3, 3, 3)]).toBe(0);
    expect(mask[idx(d, 20, 22, 15)]).toBe(1);
    expect(labelComponents(mask, d, 6).sizes.length).toBe(1);
  });

  it('refuses an image without positive voxels, a bad fraction and a size mismatch', () => {
    expect(() => autoBrainMask(new Float32Array(8), [2, 2, 2])).toThrow(BrainMaskError);
    expect(() => autoBrainMask(new Float32Array(8), [2, 2, 2])).toThrow(/upload a brain mask/);
    expect(() => autoBrainMask(mean, d, { thresholdFraction: 1.5 })).toThrow(/strictly between 0 and 1/);
    expect(() => autoBrainMask(new Float32Array(7), [2, 2, 2])).toThrow(/describe 8/);
  });
});

describe('percentileSorted (numpy.percentile default linear method, numpy 1.24 documentation)', () => {
  it('interpolates between order statistics', () => {
    const s = Float64Array.from([1, 2, 3, 4]);
    expect(percentileSorted(s, 50)).toBe(2.5);
    expect(percentileSorted(s, 98)).toBeCloseTo(3.94, 12); // pos = 0.98·3 = 2.94
    expect(percentileSorted(s, 0)).toBe(1);
    expect(percentileSorted(s, 100)).toBe(4);
  });
});
