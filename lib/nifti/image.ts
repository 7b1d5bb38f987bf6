// Decoded NIfTI image: header + raw voxel bytes, with scaled accessors that never build a float copy
// of the whole 4D image.
import { DATATYPES } from './codes';
import { NiftiError } from './errors';
import { gunzipBounded, gunzipPrefix, isGzip } from './gzip';
import { imageSizes, parseNiftiHeader, type NiftiHeader } from './header';

export interface NiftiImage {
  header: NiftiHeader;
  nx: number;
  ny: number;
  nz: number;
  nt: number;
  voxelsPerVolume: number;
  /** Scaled values of volume t (0-based) into out (length voxelsPerVolume) — x fastest. */
  readVolume(t: number, out?: Float32Array): Float32Array;
  /** Scaled time series of the given voxel indices, written voxel-major into out (length indices.length × (nt - tStart)). */
  readVoxelSeries(indices: Int32Array | Uint32Array, tStart: number, out?: Float32Array): Float32Array;
}

export interface DecodeOptions {
  /** Largest accepted nx·ny·nz·nt; default 400 million. */
  maxVoxels?: number;
}

export const DEFAULT_MAX_VOXELS = 400_000_000;
/** Bytes allowed beyond vox_offset + data size in a gzip stream (trailing padding). */
const GZIP_SLACK = 65_536;

type NumericArray = Uint8Array | Int8Array | Int16Array | Uint16Array | Int32Array | Uint32Array | Float32Array | Float64Array;
type NumericCtor = { new (buffer: ArrayBuffer, byteOffset: number, length: number): NumericArray; BYTES_PER_ELEMENT: number };

const CTORS: Record<string, NumericCtor> = {
  uint8: Uint8Array,
  int8: Int8Array,
  int16: Int16Array,
  uint16: Uint16Array,
  int32: Int32Array,
  uint32: Uint32Array,
  float32: Float32Array,
  float64: Float64Array,
};

const NATIVE_LE = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Checks the header's size against maxVoxels; throws too_large. */
export function checkSize(h: NiftiHeader, maxVoxels = DEFAULT_MAX_VOXELS): ReturnType<typeof imageSizes> {
  const s = imageSizes(h);
  if (s.totalVoxels > maxVoxels) {
    throw new NiftiError(
      'too_large',
      `The image has ${s.totalVoxels} voxels (${h.dims.join(' × ')}), more than the limit of ${maxVoxels}. Crop or split the run before uploading.`,
    );
  }
  return s;
}

/**
 * Decodes a NIfTI-1/-2 file held in memory (plain or gzip, detected by magic bytes). Checks that
 * the voxel data is complete; the returned accessors apply scl_slope/scl_inter on the fly.
 * Gzip output is bounded by vox_offset + data size + 64 KiB.
 */
export function decodeNifti(input: Uint8Array, opts: DecodeOptions = {}): NiftiImage {
  let bytes = input;
  let header: NiftiHeader;
  if (isGzip(input)) {
    header = parseNiftiHeader(gunzipPrefix(input, 544));
    const s = checkSize(header, opts.maxVoxels);
    bytes = gunzipBounded(input, header.voxOffset + s.dataBytes + GZIP_SLACK);
  } else {
    header = parseNiftiHeader(input);
  }
  return imageFromBytes(header, bytes, opts);
}

/** Builds the image accessors over already decompressed file bytes (header at offset 0). */
export function imageFromBytes(header: NiftiHeader, bytes: Uint8Array, opts: DecodeOptions = {}): NiftiImage {
  const { nx, ny, nz, nt, voxelsPerVolume, dataBytes } = checkSize(header, opts.maxVoxels);
  const present = Math.max(0, bytes.length - header.voxOffset);
  if (present < dataBytes) {
    throw new NiftiError(
      'truncated',
      `The file is truncated: the header promises ${dataBytes} bytes of voxel data but only ${present} are present. Re-export or re-upload the complete file.`,
    );
  }
  const ctor = CTORS[header.datatype];
  const bpv = DATATYPES[header.datatypeCode].bitpix / 8;
  const volBytes = voxelsPerVolume * bpv;
  const swap = header.littleEndian !== NATIVE_LE && bpv > 1;
  const base = bytes.byteOffset + header.voxOffset;
  const direct = !swap && base % bpv === 0;
  // Scratch buffers (one per slot) for volumes a direct typed view cannot cover (misaligned or swapped).
  const scratch: { bytes: Uint8Array; view: NumericArray; t: number }[] = [];

  /** Native-order typed view of the raw values of volume t; `slot` picks the scratch buffer. */
  const volumeView = (t: number, slot = 0): NumericArray => {
    if (direct) return new ctor(bytes.buffer as ArrayBuffer, base + t * volBytes, voxelsPerVolume);
    let s = scratch[slot];
    if (!s) {
      const b = new Uint8Array(volBytes);
      s = scratch[slot] = { bytes: b, view: new ctor(b.buffer as ArrayBuffer, 0, voxelsPerVolume), t: -1 };
    }
    if (s.t !== t) {
      const src = bytes.subarray(header.voxOffset + t * volBytes, header.voxOffset + (t + 1) * volBytes);
      const dst = s.bytes;
      if (!swap) dst.set(src);
      else if (bpv === 2)
        for (let i = 0; i < volBytes; i += 2) {
          dst[i] = src[i + 1];
          dst[i + 1] = src[i];
        }
      else if (bpv === 4)
        for (let i = 0; i < volBytes; i += 4) {
          dst[i] = src[i + 3];
          dst[i + 1] = src[i + 2];
          dst[i + 2] = src[i + 1];
          dst[i + 3] = src[i];
        }
      else for (let i = 0; i < volBytes; i += bpv) for (let k = 0; k < bpv; k++) dst[i + k] = src[i + bpv - 1 - k];
      s.t = t;
    }
    return s.view;
  };
  // Volumes per block in readVoxelSeries: each voxel's row then gets a run of contiguous writes.
  const block = Math.max(1, Math.min(16, Math.floor((64 * 1024 * 1024) / Math.max(1, volBytes))));

  const slope = header.sclSlope;
  const inter = header.sclInter;
  const identity = slope === 1 && inter === 0;

  const checkT = (t: number, what: string) => {
    if (!Number.isInteger(t) || t < 0 || t >= nt) {
      throw new NiftiError('bad_input', `${what} ${t} is out of range: the image has ${nt} volume(s), numbered 0 to ${nt - 1}.`);
    }
  };

  return {
    header,
    nx,
    ny,
    nz,
    nt,
    voxelsPerVolume,
    readVolume(t, out) {
      checkT(t, 'Volume');
      const dst = out ?? new Float32Array(voxelsPerVolume);
      if (dst.length < voxelsPerVolume)
        throw new NiftiError('bad_input', `The output array holds ${dst.length} values; a volume needs ${voxelsPerVolume}.`);
      const src = volumeView(t);
      if (identity) for (let i = 0; i < voxelsPerVolume; i++) dst[i] = src[i];
      else for (let i = 0; i < voxelsPerVolume; i++) dst[i] = src[i] * slope + inter;
      return dst;
    },
    readVoxelSeries(indices, tStart, out) {
      checkT(tStart, 'Start volume');
      const T = nt - tStart;
      const n = indices.length;
      const dst = out ?? new Float32Array(n * T);
      if (dst.length < n * T)
        throw new NiftiError('bad_input', `The output array holds ${dst.length} values; ${n} voxels × ${T} volumes need ${n * T}.`);
      for (let v = 0; v < n; v++) {
        const idx = indices[v];
        if (!(idx >= 0 && idx < voxelsPerVolume))
          throw new NiftiError('bad_input', `Voxel index ${idx} (position ${v}) is outside the volume of ${voxelsPerVolume} voxels.`);
      }
      // Blocks of volumes: for each voxel write `nb` neighbouring time points (cache-friendly rows).
      for (let t0 = tStart; t0 < nt; t0 += block) {
        const nb = Math.min(block, nt - t0);
        const views: NumericArray[] = [];
        for (let b = 0; b < nb; b++) views.push(volumeView(t0 + b, b));
        const col = t0 - tStart;
        for (let v = 0; v < n; v++) {
          const idx = indices[v];
          const o = v * T + col;
          if (identity) for (let b = 0; b < nb; b++) dst[o + b] = views[b][idx];
          else for (let b = 0; b < nb; b++) dst[o + b] = views[b][idx] * slope + inter;
        }
      }
      return dst;
    },
  };
}
