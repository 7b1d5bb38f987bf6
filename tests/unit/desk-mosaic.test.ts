import { describe, expect, it } from 'vitest';
import { mosaicSpec, planMosaic } from '@/lib/desk/mosaic';

describe('planMosaic', () => {
  it('fills a wide viewer with more columns than rows, every tile used', () => {
    // 900 × 400 px, square 192 mm slices: 6 × 3 tiles of 133 px cover 6·3·133²/(900·400) ≈ 0.89 (worked by hand)
    const p = planMosaic({ viewW: 900, viewH: 400, sliceW: 192, sliceH: 192, zMin: -60, zMax: 80 });
    expect(p.cols).toBeGreaterThan(p.rows);
    expect(p.slicesMm).toHaveLength(p.cols * p.rows);
    const scale = Math.min(900 / (p.cols * 192), 400 / (p.rows * 192));
    expect((p.cols * p.rows * 192 * 192 * scale * scale) / (900 * 400)).toBeGreaterThan(0.85);
  });

  it('spreads slices evenly inside the extent, ends excluded', () => {
    const p = planMosaic({ viewW: 400, viewH: 300, sliceW: 100, sliceH: 100, zMin: 0, zMax: 130, minSlices: 12, maxSlices: 12 });
    expect(p.slicesMm).toEqual([10, 20, 30, 40, 50, 60, 70, 80, 90, 100, 110, 120]);
    expect(p.cols * p.rows).toBe(12);
  });

  it('writes rows from superior to inferior with labels on', () => {
    const spec = mosaicSpec({ cols: 2, rows: 2, slicesMm: [-10, 0, 10, 20] });
    expect(spec).toBe('L+ A 20.0 10.0 ; A 0.0 -10.0');
  });
});
