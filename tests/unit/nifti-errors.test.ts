// Every NiftiError case of the reader and the grid helpers, on damaged copies of the fixtures.
// Header field offsets: nifti1.h / nifti2.h (verified against nifti_tool in nifti-layout.test.ts).
import { readFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { assertFourD, assertSameGrid, decodeNifti, encodeNifti1, NiftiError, parseNiftiHeader, type NiftiErrorCode } from '@/lib/nifti';
import { N1, N2 } from '@/lib/nifti/header-layout';

const DIR = 'tests/fixtures/nifti/';
const load = (f: string) => new Uint8Array(readFileSync(DIR + f));

function expectNiftiError(fn: () => unknown, code: NiftiErrorCode, re: RegExp) {
  let err: unknown;
  try {
    fn();
  } catch (e) {
    err = e;
  }
  expect(err, 'should throw').toBeInstanceOf(NiftiError);
  expect((err as NiftiError).code).toBe(code);
  expect((err as Error).message).toMatch(re);
}

/** A copy of a plain fixture with a header edit applied (little-endian files). */
function edited(file: string, edit: (v: DataView, b: Uint8Array) => void): Uint8Array {
  const b = load(file).slice();
  edit(new DataView(b.buffer, b.byteOffset, b.byteLength), b);
  return b;
}

describe('not_nifti', () => {
  it('a PNG', () => {
    const png = new Uint8Array(400);
    png.set([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]); // PNG signature (PNG spec §5.2)
    expectNiftiError(() => decodeNifti(png), 'not_nifti', /not a NIfTI file/);
  });
  it('a text file', () => {
    expectNiftiError(() => decodeNifti(new TextEncoder().encode('subject,age\n01,34\n'.repeat(30))), 'not_nifti', /not a NIfTI file/);
  });
  it('empty or tiny data', () => {
    expectNiftiError(() => decodeNifti(new Uint8Array(0)), 'not_nifti', /too short/);
    expectNiftiError(() => parseNiftiHeader(new Uint8Array(3)), 'not_nifti', /too short/);
  });
  it('corrupt gzip data', () => {
    const gz = gzipSync(load('dtype-int16.nii'));
    gz.fill(0xff, 10, 30);
    expectNiftiError(() => decodeNifti(new Uint8Array(gz)), 'not_nifti', /gzip data .* corrupt/);
  });
});

describe('truncated', () => {
  it('plain file missing voxel data, with the byte counts in the message', () => {
    const b = load('dtype-int16.nii');
    expectNiftiError(
      () => decodeNifti(b.subarray(0, b.length - 40)),
      'truncated',
      /promises 240 bytes of voxel data but only 200 are present.*re-upload/,
    );
  });
  it('plain file cut inside the header', () => {
    expectNiftiError(() => decodeNifti(load('dtype-int16.nii').subarray(0, 200)), 'truncated', /header needs 348 bytes but only 200/);
    expectNiftiError(() => decodeNifti(load('n2-int16-le.nii').subarray(0, 400)), 'truncated', /NIfTI-2 header needs 540/);
  });
  it('a cut gzip stream', () => {
    const gz = load('extension.nii.gz');
    expectNiftiError(() => decodeNifti(gz.subarray(0, gz.length - 30)), 'truncated', /gzip stream is cut off/);
  });
  it('a complete gzip stream of a truncated file', () => {
    const b = load('dtype-float32.nii');
    expectNiftiError(
      () => decodeNifti(new Uint8Array(gzipSync(b.subarray(0, b.length - 4)))),
      'truncated',
      /promises 480 bytes .* only 476/,
    );
  });
});

describe('bad_header', () => {
  it('sizeof_hdr wrong while the magic says NIfTI-1', () => {
    expectNiftiError(() => decodeNifti(edited('dtype-int16.nii', (v) => v.setInt32(0, 349, true))), 'bad_header', /sizeof_hdr\) reads 349/);
  });
  it('magic wrong', () => {
    expectNiftiError(
      () => decodeNifti(edited('dtype-int16.nii', (_, b) => b.set([0x6e, 0x2b, 0x39], N1.magic))),
      'bad_header',
      /magic string reads "n\+9"/,
    );
  });
  it('two-file pair magic ni1', () => {
    expectNiftiError(() => decodeNifti(edited('dtype-int16.nii', (_, b) => (b[N1.magic + 1] = 0x69))), 'bad_header', /two-file NIfTI pair/);
  });
  it('NIfTI-2 magic tail damaged by a text-mode transfer', () => {
    expectNiftiError(
      () => decodeNifti(edited('n2-int16-le.nii', (_, b) => (b[N2.magic + 4] = 0x0a))),
      'bad_header',
      /NIfTI-2 magic string is wrong/,
    );
  });
  it('vox_offset inside the header (nifti1.h: vox_offset ≥ 352 for a single file)', () => {
    expectNiftiError(
      () => decodeNifti(edited('dtype-int16.nii', (v) => v.setFloat32(N1.vox_offset, 100, true))),
      'bad_header',
      /vox_offset is 100/,
    );
  });
});

describe('unsupported_datatype names the datatype', () => {
  for (const [code, name] of [
    [32, 'complex64'],
    [128, 'rgb24'],
    [1024, 'int64'],
    [1280, 'uint64'],
    [2304, 'rgba32'],
  ] as const) {
    it(`${name} (code ${code}, nifti1.h)`, () => {
      expectNiftiError(
        () => decodeNifti(edited('dtype-int16.nii', (v) => v.setInt16(N1.datatype, code, true))),
        'unsupported_datatype',
        new RegExp(`datatype is ${name} \\(code ${code}\\)`),
      );
    });
  }
  it('an unknown code', () => {
    expectNiftiError(
      () => decodeNifti(edited('dtype-int16.nii', (v) => v.setInt16(N1.datatype, 3, true))),
      'unsupported_datatype',
      /code 3 is not a NIfTI datatype/,
    );
  });
  it('NIfTI-2, big-endian', () => {
    expectNiftiError(
      () => decodeNifti(edited('n2-float64-be.nii', (v) => v.setInt16(N2.datatype, 1792, false))),
      'unsupported_datatype',
      /complex128/,
    );
  });
});

describe('bad_dims', () => {
  it('dim[0] out of 1..7', () => {
    expectNiftiError(() => decodeNifti(edited('dtype-int16.nii', (v) => v.setInt16(N1.dim, 0, true))), 'bad_dims', /dim\[0\].*is 0/);
    expectNiftiError(() => decodeNifti(edited('dtype-int16.nii', (v) => v.setInt16(N1.dim, 8, true))), 'bad_dims', /is 8/);
  });
  it('a size ≤ 0', () => {
    expectNiftiError(() => decodeNifti(edited('dtype-int16.nii', (v) => v.setInt16(N1.dim + 4, -4, true))), 'bad_dims', /below 1/);
    expectNiftiError(() => decodeNifti(edited('n2-int16-le.nii', (v) => v.setBigInt64(N2.dim + 16, 0n, true))), 'bad_dims', /below 1/);
  });
  it('a fifth dimension above 1', () => {
    const b = edited('dtype-int16.nii', (v) => {
      v.setInt16(N1.dim, 5, true);
      v.setInt16(N1.dim + 10, 2, true);
    });
    expectNiftiError(() => decodeNifti(b), 'bad_dims', /only 3D and 4D/);
  });
});

describe('too_large', () => {
  it('more voxels than maxVoxels', () => {
    expectNiftiError(() => decodeNifti(load('dtype-int16.nii'), { maxVoxels: 100 }), 'too_large', /120 voxels .* limit of 100/);
    expectNiftiError(() => decodeNifti(load('extension.nii.gz'), { maxVoxels: 100 }), 'too_large', /limit of 100/);
  });
  it('the default limit is 400 million voxels', () => {
    const b = edited('dtype-uint8.nii', (v) => {
      v.setInt16(N1.dim + 2, 1000, true);
      v.setInt16(N1.dim + 4, 1000, true);
      v.setInt16(N1.dim + 6, 401, true);
      v.setInt16(N1.dim + 8, 1, true);
    });
    expectNiftiError(() => decodeNifti(b), 'too_large', /401000000 voxels .* 400000000/);
  });
  it('a gzip stream that inflates beyond what the header implies', () => {
    const b = load('dtype-int16.nii');
    const padded = new Uint8Array(b.length + 200_000);
    padded.set(b);
    expectNiftiError(() => decodeNifti(new Uint8Array(gzipSync(padded))), 'too_large', /decompresses to more than the 66128 bytes/);
  });
});

describe('assertFourD / assertSameGrid', () => {
  const run = parseNiftiHeader(load('dtype-int16.nii'));
  const vol = parseNiftiHeader(load('three-d.nii'));
  it('not_4d: a 3D image, or too few volumes', () => {
    expectNiftiError(() => assertFourD(vol), 'not_4d', /3D \(5 × 4 × 3\) where a 4D/);
    expectNiftiError(() => assertFourD(run, 10), 'not_4d', /too few volumes: 2, but at least 10/);
    expect(() => assertFourD(run, 2)).not.toThrow();
  });
  it('grid_mismatch: different size or different affine; a 3D mask on the run grid passes', () => {
    expect(() => assertSameGrid(run, vol)).not.toThrow(); // same grid and affine in the fixture script
    const other = parseNiftiHeader(encodeNifti1({ dims: [5, 4, 4], datatype: 'uint8', data: new Uint8Array(80) }));
    expectNiftiError(() => assertSameGrid(run, other), 'grid_mismatch', /5 × 4 × 3 voxels versus 5 × 4 × 4/);
    const shifted = { ...vol, affine: vol.affine.map((r, i) => (i === 0 ? [r[0], r[1], r[2], r[3] + 0.01] : r)) };
    expectNiftiError(() => assertSameGrid(run, shifted), 'grid_mismatch', /different voxel-to-world transforms/);
  });
});
