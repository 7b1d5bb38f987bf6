// NIfTI-1 / NIfTI-2 header parser over a DataView (own implementation; see nifti-reader.test.ts
// for the comparison with nifti-reader-js 0.8.0 and nibabel 5.0.0).
// Field layout and codes: nifti1.h and nifti2.h (NIfTI Data Format Working Group).
import { diagonalAffine, quaternionToAffine, type Affine } from './affine';
import { DATATYPES, NIFTI1_HEADER_SIZE, NIFTI1_SWAPPED, NIFTI2_HEADER_SIZE, NIFTI2_SWAPPED, SPACE_UNITS, TIME_UNITS } from './codes';
import { NiftiError } from './errors';
import { gunzipPrefix, isGzip } from './gzip';
import { N1, N2 } from './header-layout';

export interface NiftiHeader {
  version: 1 | 2;
  /** dim[1..dim[0]]: [nx, ny, nz] or [nx, ny, nz, nt] (lower-rank images keep their rank). */
  dims: number[];
  /** pixdim[0..7] as stored (pixdim[0] = qfac). */
  pixdim: number[];
  datatype: string;
  datatypeCode: number;
  bitpix: number;
  littleEndian: boolean;
  /** Byte offset of the voxel data in the (decompressed) file. */
  voxOffset: number;
  /** Effective scaling y = sclSlope·x + sclInter; 1 and 0 when the file's slope is 0 or non-finite. */
  sclSlope: number;
  sclInter: number;
  xyztUnits: number;
  spaceUnits: string;
  timeUnits: string;
  /** pixdim[4] converted to seconds (s, ms, µs; unknown units taken as s); null for 3D or non-time axes. */
  trSeconds: number | null;
  qformCode: number;
  sformCode: number;
  /** Voxel→world (mm), row-major: sform if sform_code > 0, else qform if qform_code > 0, else diag(pixdim). */
  affine: number[][];
  /** The qform as an affine (whatever qform_code says). */
  qform: number[][];
  /** The sform rows as an affine (whatever sform_code says). */
  sform: number[][];
  description: string;
  intentCode: number;
  intentName: string;
}

function ascii(bytes: Uint8Array, offset: number, length: number): string {
  let s = '';
  for (let i = 0; i < length; i++) {
    const c = bytes[offset + i];
    if (c === 0) break;
    s += String.fromCharCode(c);
  }
  return s;
}

function detectVersion(bytes: Uint8Array): { version: 1 | 2; le: boolean } {
  if (bytes.length < 4) {
    throw new NiftiError(
      'not_nifti',
      `The data is only ${bytes.length} bytes long, too short to be a NIfTI file. Upload a .nii or .nii.gz image.`,
    );
  }
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const le = v.getInt32(0, true);
  if (le === NIFTI1_HEADER_SIZE) return { version: 1, le: true };
  if (le === NIFTI1_SWAPPED) return { version: 1, le: false };
  if (le === NIFTI2_HEADER_SIZE) return { version: 2, le: true };
  if (le === NIFTI2_SWAPPED) return { version: 2, le: false };
  const magic1 = bytes.length >= 348 ? ascii(bytes, N1.magic, 4) : '';
  const magic2 = bytes.length >= 8 ? ascii(bytes, N2.magic, 4) : '';
  if (magic1 === 'n+1' || magic1 === 'ni1' || magic2 === 'n+2' || magic2 === 'ni2') {
    throw new NiftiError(
      'bad_header',
      `The NIfTI header size field (sizeof_hdr) reads ${le}; it must be 348 (NIfTI-1) or 540 (NIfTI-2). The header is damaged; re-export the file.`,
    );
  }
  throw new NiftiError(
    'not_nifti',
    'This is not a NIfTI file (the first bytes hold neither a NIfTI-1 nor a NIfTI-2 header). Upload a .nii or .nii.gz image.',
  );
}

/**
 * Parses a NIfTI-1 or NIfTI-2 header from the start of a file (plain, or gzip detected by its
 * magic bytes; the first 540 decompressed bytes suffice). Either byte order. Validates magic,
 * dims, datatype and vox_offset; computes the affine and TR in seconds.
 */
export function parseNiftiHeader(input: Uint8Array): NiftiHeader {
  const bytes = isGzip(input) ? gunzipPrefix(input, NIFTI2_HEADER_SIZE) : input;
  const { version, le } = detectVersion(bytes);
  const size = version === 1 ? NIFTI1_HEADER_SIZE : NIFTI2_HEADER_SIZE;
  if (bytes.length < size) {
    throw new NiftiError(
      'truncated',
      `The file is truncated: a NIfTI-${version} header needs ${size} bytes but only ${bytes.length} are present. Re-export or re-upload the complete file.`,
    );
  }
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const i16 = (o: number) => v.getInt16(o, le);
  const i32 = (o: number) => v.getInt32(o, le);
  const f32 = (o: number) => v.getFloat32(o, le);
  const f64 = (o: number) => v.getFloat64(o, le);
  const i64 = (o: number) => {
    const big = v.getBigInt64(o, le);
    if (big > BigInt(Number.MAX_SAFE_INTEGER) || big < -BigInt(Number.MAX_SAFE_INTEGER)) {
      throw new NiftiError(
        'bad_dims',
        `A NIfTI-2 size field at byte ${o} holds ${big}, beyond any real image. The header is damaged; re-export the file.`,
      );
    }
    return Number(big);
  };

  let magic: string;
  let dim: number[];
  let pixdim: number[];
  let datatypeCode: number;
  let bitpix: number;
  let rawVoxOffset: number;
  let slope: number;
  let inter: number;
  let xyztUnits: number;
  let qformCode: number;
  let sformCode: number;
  let quat: number[];
  let srow: number[][];
  let description: string;
  let intentCode: number;
  let intentName: string;
  if (version === 1) {
    magic = ascii(bytes, N1.magic, 4);
    dim = Array.from({ length: 8 }, (_, i) => i16(N1.dim + 2 * i));
    pixdim = Array.from({ length: 8 }, (_, i) => f32(N1.pixdim + 4 * i));
    datatypeCode = i16(N1.datatype);
    bitpix = i16(N1.bitpix);
    rawVoxOffset = f32(N1.vox_offset);
    slope = f32(N1.scl_slope);
    inter = f32(N1.scl_inter);
    xyztUnits = v.getUint8(N1.xyzt_units);
    qformCode = i16(N1.qform_code);
    sformCode = i16(N1.sform_code);
    quat = [N1.quatern_b, N1.quatern_c, N1.quatern_d, N1.qoffset_x, N1.qoffset_y, N1.qoffset_z].map(f32);
    srow = [N1.srow_x, N1.srow_y, N1.srow_z].map((o) => [0, 1, 2, 3].map((j) => f32(o + 4 * j)));
    description = ascii(bytes, N1.descrip, 80);
    intentCode = i16(N1.intent_code);
    intentName = ascii(bytes, N1.intent_name, 16);
    if (magic === 'ni1') {
      throw new NiftiError(
        'bad_header',
        'This is the header of a two-file NIfTI pair (magic "ni1"), whose voxels live in a separate file. Convert it to a single-file .nii or .nii.gz and upload that.',
      );
    }
    if (magic !== 'n+1') {
      throw new NiftiError(
        'bad_header',
        `The NIfTI-1 magic string reads ${JSON.stringify(magic)}; it must be "n+1". The header is damaged or not NIfTI; re-export the file.`,
      );
    }
  } else {
    magic = ascii(bytes, N2.magic, 4);
    const tail = Array.from(bytes.subarray(N2.magic + 4, N2.magic + 8));
    dim = Array.from({ length: 8 }, (_, i) => i64(N2.dim + 8 * i));
    pixdim = Array.from({ length: 8 }, (_, i) => f64(N2.pixdim + 8 * i));
    datatypeCode = i16(N2.datatype);
    bitpix = i16(N2.bitpix);
    rawVoxOffset = i64(N2.vox_offset);
    slope = f64(N2.scl_slope);
    inter = f64(N2.scl_inter);
    xyztUnits = i32(N2.xyzt_units);
    qformCode = i32(N2.qform_code);
    sformCode = i32(N2.sform_code);
    quat = [N2.quatern_b, N2.quatern_c, N2.quatern_d, N2.qoffset_x, N2.qoffset_y, N2.qoffset_z].map(f64);
    srow = [N2.srow_x, N2.srow_y, N2.srow_z].map((o) => [0, 1, 2, 3].map((j) => f64(o + 8 * j)));
    description = ascii(bytes, N2.descrip, 80);
    intentCode = i32(N2.intent_code);
    intentName = ascii(bytes, N2.intent_name, 16);
    if (magic === 'ni2') {
      throw new NiftiError(
        'bad_header',
        'This is the header of a two-file NIfTI-2 pair (magic "ni2"), whose voxels live in a separate file. Convert it to a single-file .nii or .nii.gz and upload that.',
      );
    }
    // nifti2.h: magic "n+2\0" followed by \r\n\032\n (detects text-mode transfer damage).
    if (magic !== 'n+2' || tail.join(',') !== '13,10,26,10') {
      throw new NiftiError(
        'bad_header',
        `The NIfTI-2 magic string is wrong (${JSON.stringify(magic)}, tail ${tail.join(' ')}); it must be "n+2\\0\\r\\n\\032\\n". The file was damaged, e.g. by a text-mode transfer; re-export it.`,
      );
    }
  }

  // dims: dim[0] = rank 1..7, each used dim ≥ 1 (nifti1.h).
  const rank = dim[0];
  if (!(rank >= 1 && rank <= 7)) {
    throw new NiftiError(
      'bad_dims',
      `The header's dim[0] (number of dimensions) is ${rank}; it must be 1 to 7. The header is damaged; re-export the file.`,
    );
  }
  const dims = dim.slice(1, rank + 1);
  if (dims.some((d) => !(d >= 1))) {
    throw new NiftiError(
      'bad_dims',
      `The image dimensions ${JSON.stringify(dims)} include a size below 1. The header is damaged; re-export the file.`,
    );
  }
  if (dims.slice(4).some((d) => d > 1)) {
    throw new NiftiError(
      'bad_dims',
      `The image has ${rank} dimensions ${JSON.stringify(dims)}; only 3D and 4D (x, y, z, time) images are supported. Split it into 4D runs.`,
    );
  }

  const dt = DATATYPES[datatypeCode];
  if (!dt) {
    throw new NiftiError(
      'unsupported_datatype',
      `The header's datatype code ${datatypeCode} is not a NIfTI datatype. The header is damaged; re-export the file.`,
    );
  }
  if (!dt.supported) {
    throw new NiftiError(
      'unsupported_datatype',
      `The image's datatype is ${dt.name} (code ${datatypeCode}), which Quorum does not read; it needs real scalar voxels (uint8, int8, int16, uint16, int32, uint32, float32 or float64). Convert the image, e.g. to float32.`,
    );
  }

  const minOffset = size + 4;
  let voxOffset = rawVoxOffset;
  if (voxOffset === 0) voxOffset = minOffset; // some writers leave 0 in single files (common practice, no source)
  if (!Number.isInteger(voxOffset) || voxOffset < minOffset) {
    throw new NiftiError(
      'bad_header',
      `The header's vox_offset is ${rawVoxOffset}; a single-file NIfTI-${version} needs a whole number of at least ${minOffset}. The header is damaged; re-export the file.`,
    );
  }

  // Scaling: nifti1.h — "If the scl_slope field is nonzero, then each voxel value ... y = scl_slope*x + scl_inter".
  const scaled = Number.isFinite(slope) && slope !== 0;
  const sclSlope = scaled ? slope : 1;
  const sclInter = scaled && Number.isFinite(inter) ? inter : 0;

  const spaceUnits = SPACE_UNITS[xyztUnits & 0x07] ?? 'unknown';
  const time = TIME_UNITS[xyztUnits & 0x38] ?? TIME_UNITS[0];
  // Unknown time units: pixdim[4] taken as seconds (common practice, no source).
  const tFactor = (xyztUnits & 0x38) === 0 ? 1 : time.seconds;
  const trSeconds = rank >= 4 && tFactor !== null && pixdim[4] > 0 && Number.isFinite(pixdim[4]) ? pixdim[4] * tFactor : null;

  const qform = quaternionToAffine({
    b: quat[0],
    c: quat[1],
    d: quat[2],
    qx: quat[3],
    qy: quat[4],
    qz: quat[5],
    qfac: pixdim[0] < 0 ? -1 : 1, // nifti1.h: qfac = pixdim[0], 0 treated as 1
    dx: Math.abs(pixdim[1]),
    dy: Math.abs(pixdim[2]),
    dz: Math.abs(pixdim[3]),
  });
  const sform: Affine = [...srow, [0, 0, 0, 1]];
  const affine = sformCode > 0 ? sform : qformCode > 0 ? qform : diagonalAffine(pixdim);

  return {
    version,
    dims,
    pixdim,
    datatype: dt.name,
    datatypeCode,
    bitpix,
    littleEndian: le,
    voxOffset,
    sclSlope,
    sclInter,
    xyztUnits,
    spaceUnits,
    timeUnits: time.name,
    trSeconds,
    qformCode,
    sformCode,
    affine,
    qform,
    sform,
    description,
    intentCode,
    intentName,
  };
}

/** Voxels per volume, volume count and voxel-data byte size implied by a header. */
export function imageSizes(h: NiftiHeader): {
  nx: number;
  ny: number;
  nz: number;
  nt: number;
  voxelsPerVolume: number;
  totalVoxels: number;
  dataBytes: number;
} {
  const [nx, ny = 1, nz = 1, nt = 1] = h.dims;
  const voxelsPerVolume = nx * ny * nz;
  const totalVoxels = voxelsPerVolume * nt;
  return { nx, ny, nz, nt, voxelsPerVolume, totalVoxels, dataBytes: totalVoxels * (DATATYPES[h.datatypeCode].bitpix / 8) };
}
