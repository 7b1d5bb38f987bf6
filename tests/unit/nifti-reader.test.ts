// Reader checks against nibabel 5.0.0 (reference.json, written by scripts/reference/make-nifti-fixtures.py)
// and against the independent registry reader nifti-reader-js 0.8.0.
import { readFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import * as nrj from 'nifti-reader-js';
import { describe, expect, it } from 'vitest';
import {
  affineMaxDiff,
  decodeNifti,
  encodeNifti1,
  diagonalAffine,
  parseNiftiHeader,
  readNiftiFile,
  readNiftiHeaderFile,
} from '@/lib/nifti';

const DIR = 'tests/fixtures/nifti/';

interface RefCase {
  file: string;
  version: 1 | 2;
  dims: number[];
  pixdim: number[];
  datatypeCode: number;
  bitpix: number;
  littleEndian: boolean;
  voxOffset: number;
  sclSlope: number;
  sclInter: number;
  xyztUnits: number;
  spaceUnits: string;
  timeUnits: string;
  qformCode: number;
  sformCode: number;
  qform: number[][];
  sform: number[][];
  bestAffine: number[][];
  description: string;
  extensions: number;
  values: (number | string)[];
}
const ref = JSON.parse(readFileSync(DIR + 'reference.json', 'utf8')) as { library: string; cases: RefCase[] };

// nibabel's unit names → ours (nibabel 5.0.0 nifti1.unit_codes).
const SPACE = { mm: 'mm', micron: 'um', meter: 'm', unknown: 'unknown' } as Record<string, string>;
const TIME = { sec: 's', msec: 'ms', usec: 'us', unknown: 'unknown' } as Record<string, string>;
const TIME_FACTOR = { sec: 1, msec: 1e-3, usec: 1e-6 } as Record<string, number>;

const expectedValue = (v: number | string) => (typeof v === 'string' ? Number(v) : Math.fround(v));

function load(file: string): Uint8Array {
  return new Uint8Array(readFileSync(DIR + file));
}

function expectValues(got: Float32Array, want: (number | string)[]) {
  expect(got.length).toBe(want.length);
  for (let i = 0; i < want.length; i++) {
    const e = expectedValue(want[i]);
    if (Number.isNaN(e)) expect(Number.isNaN(got[i]), `voxel ${i}`).toBe(true);
    else expect(got[i], `voxel ${i}`).toBe(e);
  }
}

describe(`reader vs nibabel (${ref.library})`, () => {
  it('covers every datatype, both byte orders, both versions, plain and gzip', () => {
    const codes = new Set(ref.cases.map((c) => c.datatypeCode));
    for (const code of [2, 4, 8, 16, 64, 256, 512, 768]) expect(codes.has(code)).toBe(true);
    expect(new Set(ref.cases.map((c) => `${c.version}${c.littleEndian}`)).size).toBe(4);
    expect(ref.cases.some((c) => c.file.endsWith('.gz'))).toBe(true);
  });

  for (const c of ref.cases) {
    it(`${c.file}: header facts, affine (1e-5) and scaled values (float32) match nibabel`, () => {
      const img = decodeNifti(load(c.file));
      const h = img.header;
      expect(h.version).toBe(c.version);
      expect(h.dims).toEqual(c.dims);
      h.pixdim.forEach((p, i) => expect(p).toBeCloseTo(c.pixdim[i], 6));
      expect(h.datatypeCode).toBe(c.datatypeCode);
      expect(h.bitpix).toBe(c.bitpix);
      expect(h.littleEndian).toBe(c.littleEndian);
      expect(h.voxOffset).toBe(c.voxOffset);
      expect(h.sclSlope).toBe(c.sclSlope);
      expect(h.sclInter).toBe(c.sclInter);
      expect(h.xyztUnits).toBe(c.xyztUnits);
      expect(h.spaceUnits).toBe(SPACE[c.spaceUnits]);
      expect(h.timeUnits).toBe(TIME[c.timeUnits]);
      expect(h.qformCode).toBe(c.qformCode);
      expect(h.sformCode).toBe(c.sformCode);
      expect(h.description).toBe(c.description);
      expect(affineMaxDiff(h.qform, c.qform)).toBeLessThan(1e-5);
      expect(affineMaxDiff(h.sform, c.sform)).toBeLessThan(1e-5);
      // Neither xform set: nifti1.h METHOD 1 (diag(pixdim)); nibabel's fallback centres the grid instead.
      const wantAffine = c.sformCode > 0 || c.qformCode > 0 ? c.bestAffine : diagonalAffine(c.pixdim);
      expect(affineMaxDiff(h.affine, wantAffine)).toBeLessThan(1e-5);
      if (c.dims.length === 4) expect(h.trSeconds).toBeCloseTo(c.pixdim[4] * TIME_FACTOR[c.timeUnits], 9);
      else expect(h.trSeconds).toBeNull();

      const all = new Float32Array(img.voxelsPerVolume * img.nt);
      for (let t = 0; t < img.nt; t++) all.set(img.readVolume(t), t * img.voxelsPerVolume);
      expectValues(all, c.values);
    });
  }

  it('TR is converted to seconds from ms and µs (pixdim[4] 2000 ms → 2 s; 1.5e6 µs → 1.5 s)', () => {
    expect(parseNiftiHeader(load('units-ms.nii')).trSeconds).toBeCloseTo(2, 12);
    expect(parseNiftiHeader(load('units-us.nii')).trSeconds).toBeCloseTo(1.5, 12);
  });

  it('TR with unknown time units is taken as seconds (common practice, no source); Hz gives no TR', () => {
    const base = { dims: [2, 2, 2, 3], pixdim: [1, 1, 1, 2.5], datatype: 'uint8' as const, data: new Uint8Array(24) };
    const unknown = parseNiftiHeader(encodeNifti1({ ...base, xyztUnits: 2 }));
    expect(unknown.timeUnits).toBe('unknown');
    expect(unknown.trSeconds).toBe(2.5);
    const hz = parseNiftiHeader(encodeNifti1({ ...base, xyztUnits: 2 | 32 })); // NIFTI_UNITS_HZ = 32 (nifti1.h, from memory)
    expect(hz.timeUnits).toBe('hz');
    expect(hz.trSeconds).toBeNull();
  });

  it('NaN and ±Inf voxels are returned as they are', () => {
    const v = decodeNifti(load('nonfinite.nii')).readVolume(0);
    expect(Number.isNaN(v[2])).toBe(true);
    expect(v[3]).toBe(Infinity);
    expect(v[4]).toBe(-Infinity);
  });
});

describe('readVoxelSeries', () => {
  for (const file of ['scaled-int16.nii', 'n1-int16-be.nii', 'n2-float64-be.nii', 'dtype-uint8.nii', 'extension.nii.gz']) {
    it(`${file}: voxel-major series equal the volumes, from tStart`, () => {
      const img = decodeNifti(load(file));
      const idx = Int32Array.from([0, 7, 59, 3, img.voxelsPerVolume - 1]);
      for (const tStart of [0, 1]) {
        const T = img.nt - tStart;
        const s = img.readVoxelSeries(idx, tStart);
        expect(s.length).toBe(idx.length * T);
        for (let t = tStart; t < img.nt; t++) {
          const vol = img.readVolume(t);
          idx.forEach((i, v) => expect(s[v * T + (t - tStart)]).toBe(vol[i]));
        }
      }
    });
  }

  it('works on a buffer whose voxel data is not aligned for a typed-array view', () => {
    const bytes = load('dtype-float32.nii');
    const shifted = new Uint8Array(bytes.length + 1).subarray(1);
    shifted.set(bytes);
    const a = decodeNifti(bytes);
    const b = decodeNifti(shifted);
    for (let t = 0; t < a.nt; t++) expect(b.readVolume(t)).toEqual(a.readVolume(t));
    const idx = Uint32Array.from([1, 2, 30]);
    expect(b.readVoxelSeries(idx, 0)).toEqual(a.readVoxelSeries(idx, 0));
  });

  it('runs longer than one 16-volume block: series equal volumes (aligned and misaligned buffers)', () => {
    const dims = [7, 6, 5, 37];
    const V = 7 * 6 * 5;
    const data = Int16Array.from({ length: V * 37 }, (_, i) => ((i * 7919) % 20000) - 10000);
    const bytes = encodeNifti1({ dims, datatype: 'int16', data, sclSlope: 0.5, sclInter: 2 });
    const shifted = new Uint8Array(bytes.length + 1).subarray(1);
    shifted.set(bytes);
    const idx = Int32Array.from({ length: 50 }, (_, v) => (v * 37) % V);
    for (const img of [decodeNifti(bytes), decodeNifti(shifted)]) {
      for (const tStart of [0, 3, 36]) {
        const T = 37 - tStart;
        const s = img.readVoxelSeries(idx, tStart);
        for (let v = 0; v < idx.length; v++) {
          for (let t = tStart; t < 37; t++) expect(s[v * T + t - tStart]).toBe(data[t * V + idx[v]] * 0.5 + 2);
        }
      }
    }
  });

  it('fills a caller-supplied output array and refuses one too short', () => {
    const img = decodeNifti(load('dtype-int16.nii'));
    const out = new Float32Array(2 * img.nt);
    expect(img.readVoxelSeries(Int32Array.from([4, 5]), 0, out)).toBe(out);
    expect(() => img.readVoxelSeries(Int32Array.from([4, 5]), 0, new Float32Array(3))).toThrow(/output array/);
    expect(() => img.readVoxelSeries(Int32Array.from([img.voxelsPerVolume]), 0)).toThrow(/outside the volume/);
    expect(() => img.readVolume(img.nt)).toThrow(/out of range/);
  });
});

describe('gzip and files', () => {
  it('detects gzip by magic bytes, not by file name', () => {
    const plain = load('scaled-int16.nii');
    const a = decodeNifti(plain);
    const b = decodeNifti(new Uint8Array(gzipSync(plain)));
    expect(b.header).toEqual(a.header);
    expect(b.readVolume(1)).toEqual(a.readVolume(1));
    expect(parseNiftiHeader(new Uint8Array(gzipSync(plain))).dims).toEqual([5, 4, 3, 2]);
  });

  it('readNiftiFile and readNiftiHeaderFile read .nii and .nii.gz', async () => {
    for (const file of ['n2-float32-le.nii.gz', 'qfac-neg.nii']) {
      const img = await readNiftiFile(DIR + file);
      const h = await readNiftiHeaderFile(DIR + file);
      expect(h).toEqual(img.header);
    }
  });
});

// nifti-reader-js 0.8.0 is an independent JavaScript reader from the npm registry. Where it is right
// it must agree with us; where it is wrong (found here) the test records it, so we know why we
// parse headers ourselves.
describe('agreement with nifti-reader-js 0.8.0', () => {
  const toAb = (u: Uint8Array) => u.buffer.slice(u.byteOffset, u.byteOffset + u.byteLength) as ArrayBuffer;
  for (const c of ref.cases) {
    it(`${c.file}: dims, pixdim, datatype, endianness, offset, scaling, units agree`, () => {
      let ab = toAb(load(c.file));
      if (nrj.isCompressed(ab)) ab = nrj.decompress(ab) as ArrayBuffer;
      const theirs = nrj.readHeader(ab);
      const ours = parseNiftiHeader(new Uint8Array(ab));
      expect(theirs.dims.slice(1, theirs.dims[0] + 1)).toEqual(ours.dims);
      theirs.pixDims.forEach((p, i) => expect(p).toBeCloseTo(ours.pixdim[i], 6));
      expect(theirs.datatypeCode).toBe(ours.datatypeCode);
      expect(theirs.littleEndian).toBe(ours.littleEndian);
      expect(theirs.vox_offset).toBe(ours.voxOffset);
      expect(theirs.scl_slope || 1).toBe(ours.sclSlope);
      expect(theirs.xyzt_units).toBe(ours.xyztUnits);
      const nifti2WithoutSform = c.version === 2 && c.sformCode === 0;
      if (!nifti2WithoutSform) expect(affineMaxDiff(theirs.affine, ours.affine)).toBeLessThan(1e-5);
    });
  }

  it('known defect: for NIfTI-2 without an sform, nifti-reader-js 0.8.0 ignores the qform and pixdim', () => {
    for (const file of ['n2-int16-le.nii', 'n2-float64-be.nii', 'n2-uint16-be.nii.gz']) {
      const c = ref.cases.find((x) => x.file === file)!;
      let ab = toAb(load(file));
      if (nrj.isCompressed(ab)) ab = nrj.decompress(ab) as ArrayBuffer;
      const want = c.qformCode > 0 ? c.bestAffine : diagonalAffine(c.pixdim);
      expect(affineMaxDiff(nrj.readHeader(ab).affine, want)).toBeGreaterThan(1);
      expect(affineMaxDiff(parseNiftiHeader(load(file)).affine, want)).toBeLessThan(1e-5);
    }
  });
});
