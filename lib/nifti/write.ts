// NIfTI-1 writer: single-file .nii (magic "n+1"), little-endian, vox_offset 352, optional gzip.
// Field offsets follow nifti1.h (NIfTI Data Format Working Group); see header-layout.ts.
import { writeFile } from 'node:fs/promises';
import { gzipSync } from 'node:zlib';
import { affineToQuaternion, diagonalAffine, type Affine } from './affine';
import { NiftiError } from './errors';
import { N1 } from './header-layout';

export type WritableDatatype = 'uint8' | 'int16' | 'float32';

export interface NiftiWriteInput {
  /** [nx, ny, nz] or [nx, ny, nz, nt] (1 to 7 dimensions accepted). */
  dims: number[];
  /** Voxel sizes matching dims, e.g. [3, 3, 3, 2] (last = TR in seconds for 4D). Default 1. */
  pixdim?: number[];
  /** 4×4 voxel→world (mm), row-major. Default diag(pixdim). */
  affine?: number[][];
  datatype: WritableDatatype;
  /** Voxel values in file order: x fastest, then y, z, t. */
  data: Uint8Array | Int16Array | Float32Array;
  /** Default mm + s (2 | 8). */
  xyztUnits?: number;
  /** At most 79 ASCII characters. */
  description?: string;
  sclSlope?: number;
  sclInter?: number;
  intentCode?: number;
  /** At most 15 ASCII characters. */
  intentName?: string;
  /** Default 2 (aligned anatomical). */
  sformCode?: number;
  /** Default: sformCode when the affine is rigid (rotation × voxel sizes), else 0. */
  qformCode?: number;
  /**
   * The qform's own voxel→world transform when it differs from the sform (as an input header may
   * carry); default: the affine. Must be rigid (rotation × voxel sizes, optionally reflected).
   */
  qformAffine?: number[][];
}

/**
 * The spatial fields of an input header to pass to the writer so an output on the same grid keeps
 * the input's qform_code and sform_code (nifti1.h: NIFTI_XFORM_SCANNER_ANAT = 1, ALIGNED_ANAT = 2,
 * TALAIRACH = 3, MNI_152 = 4) and both transforms, instead of relabelling them.
 * With both codes 0 (an "Analyze-like" header) the output gets the pixdim diagonal as before,
 * written with sform_code 0 and qform_code 0 so it claims no more than the input did.
 */
export function spatialFieldsOf(h: {
  affine: number[][];
  qform: number[][];
  qformCode: number;
  sformCode: number;
}): Pick<NiftiWriteInput, 'affine' | 'sformCode' | 'qformCode' | 'qformAffine'> {
  const copy = (a: number[][]) => a.map((r) => [...r]);
  return {
    affine: copy(h.affine),
    sformCode: h.sformCode,
    qformCode: h.qformCode,
    qformAffine: h.qformCode > 0 ? copy(h.qform) : undefined,
  };
}

const WRITABLE: Record<
  WritableDatatype,
  { code: number; bitpix: number; ctor: typeof Uint8Array | typeof Int16Array | typeof Float32Array }
> = {
  uint8: { code: 2, bitpix: 8, ctor: Uint8Array },
  int16: { code: 4, bitpix: 16, ctor: Int16Array },
  float32: { code: 16, bitpix: 32, ctor: Float32Array },
};

const VOX_OFFSET = 352; // 348-byte header + 4 extension-flag bytes (nifti1.h)

function bad(message: string): never {
  throw new NiftiError('bad_input', message);
}

function writeAscii(view: DataView, offset: number, text: string, maxLen: number, field: string): void {
  if (text.length > maxLen) bad(`The ${field} is ${text.length} characters long; NIfTI-1 allows at most ${maxLen}. Shorten it.`);
  for (let i = 0; i < text.length; i++) {
    const ch = text.charCodeAt(i);
    if (ch > 126 || ch < 32) bad(`The ${field} contains a non-printable or non-ASCII character at position ${i}; use plain ASCII.`);
    view.setUint8(offset + i, ch);
  }
}

/**
 * Encodes an image as uncompressed NIfTI-1 bytes: 348-byte header, 4 zero extension bytes, then
 * voxel data little-endian in file order (x fastest). The affine is written as sform (code 2 unless
 * given) and, when it is a rotation times voxel sizes (possibly with one reflection, qfac −1), also
 * as qform; pixdim[1..3] are taken from the affine's column norms.
 */
export function encodeNifti1(input: NiftiWriteInput): Uint8Array {
  const spec = WRITABLE[input.datatype];
  if (!spec) bad(`Datatype "${String(input.datatype)}" cannot be written; use uint8, int16 or float32.`);
  const dims = input.dims;
  if (!Array.isArray(dims) || dims.length < 1 || dims.length > 7) bad(`dims must list 1 to 7 sizes; got ${JSON.stringify(dims)}.`);
  for (const d of dims) {
    if (!Number.isInteger(d) || d < 1 || d > 32767)
      bad(`Every dimension must be an integer from 1 to 32767 (NIfTI-1 stores shorts); got ${JSON.stringify(dims)}.`);
  }
  const nvox = dims.reduce((a, b) => a * b, 1);
  if (!(input.data instanceof spec.ctor))
    bad(`datatype "${input.datatype}" needs a ${spec.ctor.name}; got ${input.data?.constructor?.name ?? typeof input.data}.`);
  if (input.data.length !== nvox) bad(`dims ${JSON.stringify(dims)} need ${nvox} voxel values; data holds ${input.data.length}.`);

  const pixdim = new Array<number>(8).fill(1);
  if (input.pixdim) {
    if (input.pixdim.length > dims.length) bad(`pixdim has ${input.pixdim.length} entries but dims only ${dims.length}.`);
    input.pixdim.forEach((p, i) => {
      if (!Number.isFinite(p) || p <= 0) bad(`pixdim entries must be positive numbers; got ${JSON.stringify(input.pixdim)}.`);
      pixdim[i + 1] = p;
    });
  }
  const affine: Affine = input.affine ?? diagonalAffine(pixdim);
  if (affine.length !== 4 || affine.some((row) => row.length !== 4 || row.some((x) => !Number.isFinite(x)))) {
    bad('affine must be a 4×4 array of finite numbers (row-major voxel→world, mm).');
  }
  const qAffine: Affine = input.qformAffine ?? affine;
  if (qAffine.length !== 4 || qAffine.some((row) => row.length !== 4 || row.some((x) => !Number.isFinite(x)))) {
    bad('qformAffine must be a 4×4 array of finite numbers (row-major voxel→world, mm).');
  }
  const quat = affineToQuaternion(qAffine);
  const zooms = [0, 1, 2].map((j) => Math.hypot(affine[0][j], affine[1][j], affine[2][j]));
  if (zooms.some((z) => !(z > 0))) bad('The affine is singular (a column of its 3×3 part is zero); give a proper voxel→world transform.');
  if (input.affine && input.pixdim) {
    for (let j = 0; j < Math.min(3, input.pixdim.length); j++) {
      if (Math.abs(input.pixdim[j] - zooms[j]) > 1e-4 * Math.max(1, zooms[j])) {
        bad(`pixdim[${j}] = ${input.pixdim[j]} disagrees with the affine's voxel size ${zooms[j]} along that axis; make them consistent.`);
      }
    }
  }
  for (let j = 0; j < 3; j++) pixdim[j + 1] = quat ? [quat.dx, quat.dy, quat.dz][j] : zooms[j];
  pixdim[0] = quat ? quat.qfac : 1;

  const sformCode = input.sformCode ?? 2;
  const qformCode = quat ? (input.qformCode ?? (sformCode || 2)) : 0;
  if (input.qformCode && !quat) bad('A qform was requested but the affine has shear, which a qform cannot represent; omit qformCode.');
  if (input.qformAffine && !quat) bad('qformAffine has shear, which a qform cannot represent; pass a rotation times voxel sizes.');

  const bytesPer = spec.bitpix / 8;
  const out = new Uint8Array(VOX_OFFSET + nvox * bytesPer);
  const v = new DataView(out.buffer);
  const LE = true;
  v.setInt32(N1.sizeof_hdr, 348, LE);
  v.setUint8(N1.regular, 'r'.charCodeAt(0));
  v.setInt16(N1.dim, dims.length, LE);
  for (let i = 0; i < 7; i++) v.setInt16(N1.dim + 2 * (i + 1), dims[i] ?? 1, LE);
  v.setInt16(N1.intent_code, input.intentCode ?? 0, LE);
  v.setInt16(N1.datatype, spec.code, LE);
  v.setInt16(N1.bitpix, spec.bitpix, LE);
  for (let i = 0; i < 8; i++) v.setFloat32(N1.pixdim + 4 * i, pixdim[i], LE);
  v.setFloat32(N1.vox_offset, VOX_OFFSET, LE);
  const slope = input.sclSlope ?? 1;
  const inter = input.sclInter ?? 0;
  if (!Number.isFinite(slope) || !Number.isFinite(inter)) bad('sclSlope and sclInter must be finite numbers.');
  v.setFloat32(N1.scl_slope, slope, LE);
  v.setFloat32(N1.scl_inter, inter, LE);
  const units = input.xyztUnits ?? 2 | 8;
  if (!Number.isInteger(units) || units < 0 || units > 255) bad(`xyztUnits must be an integer 0..255; got ${units}.`);
  v.setUint8(N1.xyzt_units, units);
  writeAscii(v, N1.descrip, input.description ?? '', 79, 'description');
  v.setInt16(N1.qform_code, qformCode, LE);
  v.setInt16(N1.sform_code, sformCode, LE);
  if (quat) {
    v.setFloat32(N1.quatern_b, quat.b, LE);
    v.setFloat32(N1.quatern_c, quat.c, LE);
    v.setFloat32(N1.quatern_d, quat.d, LE);
    v.setFloat32(N1.qoffset_x, quat.qx, LE);
    v.setFloat32(N1.qoffset_y, quat.qy, LE);
    v.setFloat32(N1.qoffset_z, quat.qz, LE);
  }
  for (let j = 0; j < 4; j++) {
    v.setFloat32(N1.srow_x + 4 * j, affine[0][j], LE);
    v.setFloat32(N1.srow_y + 4 * j, affine[1][j], LE);
    v.setFloat32(N1.srow_z + 4 * j, affine[2][j], LE);
  }
  writeAscii(v, N1.intent_name, input.intentName ?? '', 15, 'intent name');
  writeAscii(v, N1.magic, 'n+1', 3, 'magic');
  // bytes 348..351: extension flag 0 (no extensions).

  const data = input.data;
  const nativeLE = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
  if (nativeLE || bytesPer === 1) {
    out.set(new Uint8Array(data.buffer, data.byteOffset, data.byteLength), VOX_OFFSET);
  } else if (data instanceof Int16Array) {
    for (let i = 0; i < nvox; i++) v.setInt16(VOX_OFFSET + 2 * i, data[i], LE);
  } else {
    for (let i = 0; i < nvox; i++) v.setFloat32(VOX_OFFSET + 4 * i, (data as Float32Array)[i], LE);
  }
  return out;
}

/** Writes a NIfTI-1 file; gzip-compressed when the path ends with ".gz". */
export async function writeNiftiFile(path: string, input: NiftiWriteInput): Promise<void> {
  const bytes = encodeNifti1(input);
  await writeFile(path, path.toLowerCase().endsWith('.gz') ? gzipSync(bytes, { level: 6 }) : bytes);
}
