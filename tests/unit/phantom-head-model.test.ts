import { describe, expect, it } from 'vitest';
import { headModel, TISSUE } from '@/lib/phantom';

describe('phantom head model', () => {
  it('tiny: grid, mask and tissue labels are consistent', () => {
    const h = headModel('tiny');
    expect(h.dims).toEqual([20, 24, 16]);
    const nv = 20 * 24 * 16;
    expect(h.tissue.length).toBe(nv);
    const counts = [0, 0, 0, 0];
    let mask = 0;
    for (let i = 0; i < nv; i++) {
      counts[h.tissue[i]]++;
      mask += h.brainMask[i];
      expect(h.brainMask[i] === 1).toBe(h.tissue[i] > 0);
      if (h.brainMask[i]) expect(h.headMask[i]).toBe(1);
    }
    expect(mask).toBe(h.brainVoxels);
    // Deterministic geometry: the exact count guards against accidental changes to the head.
    expect(mask).toBe(2124);
    expect(counts[TISSUE.grey]).toBeGreaterThan(counts[TISSUE.white] * 0.3);
    expect(counts[TISSUE.white]).toBeGreaterThan(0);
    expect(counts[TISSUE.csf]).toBeGreaterThan(10);
    // Scalp and skull exist outside the brain, and background outside the head.
    let shell = 0;
    let background = 0;
    for (let i = 0; i < nv; i++) {
      if (h.headMask[i] && !h.brainMask[i]) shell++;
      if (!h.headMask[i]) background++;
    }
    expect(shell).toBeGreaterThan(200);
    expect(background).toBeGreaterThan(1000);
  });

  it('S: about 50k brain voxels (40k–60k), computed without generating any data', () => {
    const h = headModel('S');
    expect(h.brainVoxels).toBeGreaterThanOrEqual(40_000);
    expect(h.brainVoxels).toBeLessThanOrEqual(60_000);
  });

  it('affine maps the grid centre to the world origin with the voxel sizes on the diagonal', () => {
    const h = headModel('small');
    const [nx, ny, nz] = h.dims;
    const c = [(nx - 1) / 2, (ny - 1) / 2, (nz - 1) / 2, 1];
    for (let r = 0; r < 3; r++) {
      const w = h.affine[r].reduce((s, a, j) => s + a * c[j], 0);
      expect(Math.abs(w)).toBeLessThan(1e-9);
      expect(h.affine[r][r]).toBe(h.voxelSize[r]);
    }
  });
});
