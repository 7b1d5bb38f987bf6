// The desk's map payload (lib/desk/map-payload.ts, lib/desk/map-store.ts): a run's z-maps as
// in-mask values quantised to 16 bits per map, decoded back onto the grid in the browser.
// Checks: values come back within the quantisation bound max|z| / 65534 (rounding to the nearest of
// 65535 evenly spaced levels: half a step, common practice, no source); each map's largest |z| comes
// back exact (it is stored as ±32767); voxels land on the same grid indices and everything outside
// the mask is exactly 0; the NIfTI volume the viewer loads has the components' grid, read with the
// project's own NIfTI reader (checked against nibabel in nifti-reader.test.ts).
import { describe, expect, it } from 'vitest';
import { decodeLayout, decodeMaps, emptyMapVolume, encodeLayout, encodeMaps, expandMap, quantiseMap } from '@/lib/desk/map-payload';
import { encodeDeskMaps } from '@/lib/desk/map-store';
import { decodeNifti, diagonalAffine, parseNiftiHeader, affineMaxDiff } from '@/lib/nifti';
import { createRng } from '@/lib/random';

const dims: [number, number, number] = [7, 6, 5];
const nVox = 7 * 6 * 5;

/** k maps on the grid: a blob of random z in a spherical mask, 0 outside; map 2 all zero. */
function phantomMaps(k: number, seed: number) {
  const rng = createRng(seed);
  const mask = new Uint8Array(nVox);
  for (let z = 0; z < 5; z++)
    for (let y = 0; y < 6; y++)
      for (let x = 0; x < 7; x++) if ((x - 3) ** 2 + (y - 2.5) ** 2 + (z - 2) ** 2 < 7) mask[x + 7 * (y + 6 * z)] = 1;
  const maps = new Float32Array(k * nVox);
  for (let c = 0; c < k; c++) {
    if (c === 2) continue;
    const spread = 1 + 6 * c;
    for (let i = 0; i < nVox; i++) if (mask[i]) maps[c * nVox + i] = (rng.next() * 2 - 1) * spread;
  }
  return { mask, maps };
}

const grid = {
  pixdim: [1, 3, 3, 3.5, 1, 0, 0, 0],
  affine: diagonalAffine([1, 3, 3, 3.5]).map((r, i) => (i < 3 ? [r[0]!, r[1]!, r[2]!, -30 + i] : r)),
  qform: diagonalAffine([1, 3, 3, 3.5]),
  qformCode: 0,
  sformCode: 1,
  xyztUnits: 2,
};

function splitFile(bytes: Uint8Array) {
  const view = new DataView(bytes.buffer, bytes.byteOffset);
  const head = view.getUint32(0, true);
  return { layout: bytes.subarray(8, 8 + head), body: bytes.subarray(8 + head) };
}

describe('desk map payload', () => {
  it('round trip: every voxel within max|z| / 65534, max |z| exact, mask placement exact, zero outside', () => {
    const k = 4;
    const { mask, maps } = phantomMaps(k, 11);
    const file = encodeDeskMaps({ dims, k, grid, mask, readMap: (c) => maps.subarray(c * nVox, (c + 1) * nVox) });
    const { layout: lb, body } = splitFile(file);
    const layout = decodeLayout(lb);
    const decoded = decodeMaps(body);
    expect(layout.k).toBe(k);
    expect(layout.dims).toEqual(dims);
    expect(Array.from(layout.inMask)).toEqual(Array.from(mask.keys()).filter((i) => mask[i]));
    expect([decoded.from, decoded.count, decoded.nIn]).toEqual([1, k, layout.inMask.length]);
    for (let c = 0; c < k; c++) {
      const original = maps.subarray(c * nVox, (c + 1) * nVox);
      const back = expandMap(layout, decoded, c);
      let max = 0;
      for (const v of original) max = Math.max(max, Math.abs(v));
      const bound = max / 65534 + max * 1e-6; // half a quantisation step, plus float32 rounding of the scale
      let backMax = 0;
      for (let i = 0; i < nVox; i++) {
        if (!mask[i]) expect(back[i], `voxel ${i} outside the mask`).toBe(0);
        expect(Math.abs(back[i]! - original[i]!), `map ${c} voxel ${i}`).toBeLessThanOrEqual(bound);
        backMax = Math.max(backMax, Math.abs(back[i]!));
      }
      expect(backMax).toBeCloseTo(max, 5);
    }
    // an all-zero map stays all zero (scale 0, no division by zero)
    expect(decoded.scales[2]).toBe(0);
    expect(expandMap(layout, decoded, 2).every((v) => v === 0)).toBe(true);
  });

  it('a voxel outside the mask that holds a value is kept, not dropped', () => {
    const { mask, maps } = phantomMaps(2, 3);
    maps[0] = 4.25; // voxel 0 is outside the spherical mask
    expect(mask[0]).toBe(0);
    const file = encodeDeskMaps({ dims, k: 2, grid, mask, readMap: (c) => maps.subarray(c * nVox, (c + 1) * nVox) });
    const { layout: lb, body } = splitFile(file);
    const layout = decodeLayout(lb);
    expect(layout.inMask[0]).toBe(0);
    expect(expandMap(layout, decodeMaps(body), 0)[0]).toBeCloseTo(4.25, 3);
  });

  it('quantiseMap: the colour bar figures read true to 2 significant figures (threshold 3.1 of a map up to 17.3)', () => {
    const values = Float32Array.from([3.1, -3.1, 17.3, -8.04, 0.0001, Number.NaN]);
    const q = new Int16Array(values.length);
    const scale = quantiseMap(values, q);
    const back = Array.from(q, (v) => v * scale);
    expect(back[0]!.toPrecision(2)).toBe('3.1');
    expect(back[1]!.toPrecision(2)).toBe('-3.1');
    expect(back[2]!.toFixed(2)).toBe('17.30');
    expect(back[3]!.toFixed(2)).toBe('-8.04');
    expect(back[5]).toBe(0); // not finite → 0
  });

  it('a range message carries exactly the maps asked for', () => {
    const nIn = 3;
    const bytes = encodeMaps({
      from: 5,
      count: 2,
      nIn,
      scales: Float32Array.from([0.5, 0.25]),
      q: Int16Array.from([1, -2, 3, 4, 5, -32767]),
    });
    const m = decodeMaps(bytes);
    expect([m.from, m.count, m.nIn]).toEqual([5, 2, 3]);
    expect(Array.from(m.q)).toEqual([1, -2, 3, 4, 5, -32767]);
    expect(() => decodeMaps(bytes.subarray(0, bytes.length - 2))).toThrow(/wrong length/);
    expect(() => decodeLayout(bytes)).toThrow(/not a desk map layout/);
  });

  it("the viewer's map volume is a valid NIfTI-1 on the components' grid, one zero frame", () => {
    const { mask, maps } = phantomMaps(3, 5);
    const file = encodeDeskMaps({ dims, k: 3, grid, mask, readMap: (c) => maps.subarray(c * nVox, (c + 1) * nVox) });
    const layout = decodeLayout(splitFile(file).layout);
    const buf = new Uint8Array(emptyMapVolume(layout));
    const h = parseNiftiHeader(buf);
    expect(h.dims).toEqual([7, 6, 5]);
    expect(h.datatype).toBe('float32');
    expect(h.voxOffset).toBe(352);
    expect(affineMaxDiff(h.affine, grid.affine)).toBeLessThan(1e-5);
    const img = decodeNifti(buf);
    expect(img.nt).toBe(1);
    expect(img.readVolume(0).every((v) => v === 0)).toBe(true);
    expect(encodeLayout(layout)).toEqual(splitFile(file).layout);
  });
});
