// Writer round trips: encodeNifti1 output parsed by our reader and by nifti-reader-js 0.8.0
// (an independent reader from the npm registry). Also checked once by hand with nifti_tool 2.09
// and nibabel 5.0.0 (see the helper's report).
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as nrj from 'nifti-reader-js';
import { describe, expect, it } from 'vitest';
import { affineMaxDiff, decodeNifti, encodeNifti1, NiftiError, readNiftiFile, writeNiftiFile, type NiftiWriteInput } from '@/lib/nifti';

function rotZ(deg: number): number[][] {
  const t = (deg * Math.PI) / 180;
  return [
    [Math.cos(t), -Math.sin(t), 0],
    [Math.sin(t), Math.cos(t), 0],
    [0, 0, 1],
  ];
}
/** R·diag(zooms) with translation, optionally reflecting the third axis (qfac −1). */
function affine(deg: number, zooms: number[], offset: number[], flip = false): number[][] {
  const r = rotZ(deg);
  return [0, 1, 2].map((i) => [...[0, 1, 2].map((j) => r[i][j] * zooms[j] * (flip && j === 2 ? -1 : 1)), offset[i]]).concat([[0, 0, 0, 1]]);
}

const dims4 = [6, 5, 4, 3];
const n4 = dims4.reduce((a, b) => a * b);
const inputs: Record<string, NiftiWriteInput> = {
  'uint8 3D diag': {
    dims: [6, 5, 4],
    pixdim: [1.5, 2, 2.5],
    datatype: 'uint8',
    data: Uint8Array.from({ length: 120 }, (_, i) => (i * 7) % 256),
  },
  'int16 4D rotated, scaled': {
    dims: dims4,
    pixdim: [2, 2, 3, 0.8],
    affine: affine(25, [2, 2, 3], [-60, 40.5, -12]),
    datatype: 'int16',
    data: Int16Array.from({ length: n4 }, (_, i) => ((i * 977) % 65536) - 32768),
    sclSlope: 0.25,
    sclInter: 7,
    description: 'phantom run',
  },
  'float32 4D reflected (qfac -1)': {
    dims: dims4,
    pixdim: [3, 3, 3, 2],
    affine: affine(-40, [3, 3, 3], [1, 2, 3], true),
    datatype: 'float32',
    data: Float32Array.from({ length: n4 }, (_, i) => Math.sin(i) * 1000),
    intentCode: 5,
    intentName: 'zscore',
  },
  'float32 3D sheared (sform only)': {
    dims: [6, 5, 4],
    datatype: 'float32',
    data: new Float32Array(120).fill(1.25),
    affine: [
      [2, 0.5, 0, 0],
      [0, 2, 0, 0],
      [0, 0, 2, 0],
      [0, 0, 0, 1],
    ],
  },
};

const asAb = (u: Uint8Array) => u.buffer.slice(u.byteOffset, u.byteOffset + u.byteLength) as ArrayBuffer;

describe('encodeNifti1 round trip', () => {
  for (const [name, input] of Object.entries(inputs)) {
    it(`${name}: our reader and nifti-reader-js 0.8.0 read back what was written`, () => {
      const bytes = encodeNifti1(input);
      expect(bytes.length).toBe(352 + input.data.byteLength); // nifti1.h: 348 + 4 extension bytes, then data
      const img = decodeNifti(bytes);
      const h = img.header;
      expect(h.version).toBe(1);
      expect(h.dims).toEqual(input.dims);
      expect(h.datatype).toBe(input.datatype);
      expect(h.voxOffset).toBe(352);
      expect(h.spaceUnits).toBe('mm');
      expect(h.timeUnits).toBe('s');
      expect(h.description).toBe(input.description ?? '');
      const slope = input.sclSlope ?? 1;
      const inter = input.sclInter ?? 0;
      const T = input.dims[3] ?? 1;
      const V = input.dims[0] * input.dims[1] * input.dims[2];
      for (let t = 0; t < T; t++) {
        const vol = img.readVolume(t);
        for (let i = 0; i < V; i++) expect(vol[i]).toBe(Math.fround(input.data[t * V + i] * slope + inter));
      }
      if (input.dims.length === 4) expect(h.trSeconds).toBeCloseTo(input.pixdim![3], 6);
      const wantAffine = input.affine ?? [
        [1.5, 0, 0, 0],
        [0, 2, 0, 0],
        [0, 0, 2.5, 0],
        [0, 0, 0, 1],
      ];
      expect(affineMaxDiff(h.affine, wantAffine)).toBeLessThan(1e-5);
      expect(h.sformCode).toBe(2);
      const sheared = name.includes('sheared');
      expect(h.qformCode).toBe(sheared ? 0 : 2);
      if (!sheared) expect(affineMaxDiff(h.qform, wantAffine)).toBeLessThan(1e-5);
      expect(h.pixdim[0]).toBe(name.includes('qfac -1') ? -1 : 1);

      // Independent reader.
      const theirs = nrj.readHeader(asAb(bytes));
      expect(nrj.isNIFTI1(asAb(bytes))).toBe(true);
      expect(theirs.dims.slice(1, theirs.dims[0] + 1)).toEqual(input.dims);
      expect(theirs.datatypeCode).toBe({ uint8: 2, int16: 4, float32: 16 }[input.datatype]);
      expect(theirs.scl_slope).toBe(slope);
      expect(theirs.scl_inter).toBe(inter);
      expect(theirs.description).toBe(input.description ?? '');
      expect(affineMaxDiff(theirs.affine, wantAffine)).toBeLessThan(1e-5);
      if (!sheared) {
        const q = theirs.getQformMat();
        expect(affineMaxDiff(q, wantAffine)).toBeLessThan(1e-5);
      }
      const raw = new Uint8Array(nrj.readImage(theirs, asAb(bytes)));
      expect(raw).toEqual(new Uint8Array(input.data.buffer, input.data.byteOffset, input.data.byteLength));
      expect(theirs.intent_code).toBe(input.intentCode ?? 0);
      expect(theirs.intent_name).toBe(input.intentName ?? '');
    });
  }

  it('writeNiftiFile gzips .nii.gz (gzip magic 1f 8b, RFC 1952) and writes plain .nii otherwise', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'quorum-nifti-'));
    const input = inputs['int16 4D rotated, scaled'];
    await writeNiftiFile(join(dir, 'a.nii.gz'), input);
    await writeNiftiFile(join(dir, 'a.nii'), input);
    const gz = readFileSync(join(dir, 'a.nii.gz'));
    expect([gz[0], gz[1]]).toEqual([0x1f, 0x8b]);
    expect(new Uint8Array(readFileSync(join(dir, 'a.nii')))).toEqual(encodeNifti1(input));
    const a = await readNiftiFile(join(dir, 'a.nii.gz'));
    expect(a.readVolume(2)).toEqual((await readNiftiFile(join(dir, 'a.nii'))).readVolume(2));
  });
});

describe('encodeNifti1 refuses bad input with NiftiError bad_input', () => {
  const base = inputs['uint8 3D diag'];
  const cases: [string, NiftiWriteInput, RegExp][] = [
    ['data length', { ...base, data: new Uint8Array(10) }, /need 120 voxel values/],
    ['array type', { ...base, data: new Int16Array(120) }, /needs a Uint8Array/],
    ['zero dim', { ...base, dims: [6, 0, 4] }, /integer from 1 to 32767/],
    ['too many dims', { ...base, dims: [1, 1, 1, 1, 1, 1, 1, 120] }, /1 to 7/],
    ['long description', { ...base, description: 'x'.repeat(80) }, /at most 79/],
    ['non-ASCII description', { ...base, description: 'séance' }, /ASCII/],
    ['pixdim vs affine', { ...base, affine: affine(0, [2, 2, 2], [0, 0, 0]) }, /disagrees with the affine/],
    ['negative pixdim', { ...base, pixdim: [1, -2, 1] }, /positive/],
    [
      'singular affine',
      {
        ...base,
        pixdim: undefined,
        affine: [
          [0, 0, 0, 0],
          [0, 1, 0, 0],
          [0, 0, 1, 0],
          [0, 0, 0, 1],
        ],
      },
      /singular/,
    ],
    ['datatype', { ...base, datatype: 'float64' as never }, /cannot be written/],
  ];
  for (const [name, input, re] of cases) {
    it(name, () => {
      let err: unknown;
      try {
        encodeNifti1(input);
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(NiftiError);
      expect((err as NiftiError).code).toBe('bad_input');
      expect((err as Error).message).toMatch(re);
    });
  }
});
