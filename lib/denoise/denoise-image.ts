/**
 * Denoises one 4D run into a NIfTI-1 float32 .nii.gz, volume by volume: pass 1 reads each kept
 * volume and accumulates the least-squares fit (VolumeRegression), pass 2 reads it again and
 * streams the cleaned volume through gzip to the file while hashing the compressed bytes. Only
 * in-mask voxels are regressed; voxels outside the mask keep their values. Framework-free.
 */
import { createHash } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { createGzip } from 'node:zlib';
import { encodeNifti1, spatialFieldsOf, type NiftiImage } from '@/lib/nifti';
import { N1 } from '@/lib/nifti/header-layout';
import type { MotionParams } from '@/lib/decomposition/motion';
import { buildDesign, RegressionError, VolumeRegression, type RegressionMode } from './regress';

export interface DenoiseImageInput {
  image: NiftiImage;
  /** Initial volumes the decomposition dropped; the output has nt − drop volumes. */
  drop: number;
  /** Component time courses, time-major T × k, T = nt − drop. */
  timecourses: Float32Array | Float64Array;
  k: number;
  /** 1-based component numbers to remove. */
  noise: readonly number[];
  mode: RegressionMode;
  /** Motion parameters for the kept volumes (length T each); added as six removed regressors. */
  motion?: MotionParams;
  /** 3D mask (1 = regress); default every voxel. */
  mask?: Uint8Array;
  outPath: string;
  onProgress?: (percent: number) => void;
}

export interface DenoiseImageResult {
  sha256: string;
  bytes: number;
  volumes: number;
  voxelsRegressed: number;
  columns: string[];
}

/** Six motion parameters as a time-major T × 6 block (tx, ty, tz, rx, ry, rz). */
export function motionRegressors(motion: MotionParams, T: number): { values: Float64Array; m: number; names: string[] } {
  const cols = [...motion.translations, ...motion.rotations];
  if (cols.length !== 6 || cols.some((c) => c.length !== T))
    throw new RegressionError(`The motion table must give 6 columns of ${T} rows (after dropped volumes).`);
  const values = new Float64Array(T * 6);
  for (let t = 0; t < T; t++) for (let j = 0; j < 6; j++) values[t * 6 + j] = cols[j]![t]!;
  return { values, m: 6, names: ['motion_trans_x', 'motion_trans_y', 'motion_trans_z', 'motion_rot_x', 'motion_rot_y', 'motion_rot_z'] };
}

/** The 352-byte NIfTI-1 header of a float32 4D image with the input's grid, affine and TR. */
function header4d(image: NiftiImage, T: number): Uint8Array {
  const h = image.header;
  const voxel = [1, 2, 3].map((i) => h.pixdim[i] ?? 1);
  const tr = h.pixdim[4] && h.pixdim[4] > 0 ? h.pixdim[4] : 1;
  const one = encodeNifti1({
    dims: [image.nx, image.ny, image.nz, 1],
    pixdim: [...voxel, tr],
    ...spatialFieldsOf(h), // keep the run's qform/sform and their codes (nifti1.h)
    datatype: 'float32',
    data: new Float32Array(image.voxelsPerVolume),
    xyztUnits: h.xyztUnits,
    description: 'Quorum denoised run',
  });
  const out = one.slice(0, 352);
  new DataView(out.buffer).setInt16(N1.dim + 8, T, true); // dim[4] = T
  return out;
}

export async function denoiseImage(input: DenoiseImageInput): Promise<DenoiseImageResult> {
  const { image, drop } = input;
  const T = image.nt - drop;
  if (T < 2) throw new RegressionError(`The run has ${image.nt} volumes and ${drop} are dropped; nothing is left to denoise.`);
  if (input.timecourses.length !== T * input.k) {
    throw new RegressionError(
      `The component time courses have ${input.timecourses.length / Math.max(1, input.k)} time points but the run has ${T} after dropping ${drop} volumes.`,
    );
  }
  const design = buildDesign({
    timecourses: input.timecourses,
    T,
    k: input.k,
    noise: input.noise,
    mode: input.mode,
    extra: input.motion ? motionRegressors(input.motion, T) : undefined,
  });
  const N = image.voxelsPerVolume;
  if (input.mask && input.mask.length !== N)
    throw new RegressionError(`The mask has ${input.mask.length} voxels; the run's volumes have ${N}.`);
  const idx: number[] = [];
  for (let i = 0; i < N; i++) if (!input.mask || input.mask[i]) idx.push(i);
  const where = Int32Array.from(idx);
  const V = where.length;
  const reg = new VolumeRegression(design, V);
  const vol = new Float32Array(N);
  const inMask = new Float32Array(V);
  const cleaned = new Float32Array(V);
  for (let t = 0; t < T; t++) {
    image.readVolume(drop + t, vol);
    for (let j = 0; j < V; j++) inMask[j] = vol[where[j]!]!;
    reg.accumulate(t, inMask);
    if (t % 16 === 0) input.onProgress?.((50 * t) / T);
  }

  const hash = createHash('sha256');
  let bytes = 0;
  const counter = new Transform({
    transform(chunk: Buffer, _enc, done) {
      hash.update(chunk);
      bytes += chunk.length;
      done(null, chunk);
    },
  });
  async function* volumes() {
    yield Buffer.from(header4d(image, T));
    for (let t = 0; t < T; t++) {
      image.readVolume(drop + t, vol);
      for (let j = 0; j < V; j++) inMask[j] = vol[where[j]!]!;
      reg.apply(t, inMask, cleaned);
      const out = Float32Array.from(vol);
      for (let j = 0; j < V; j++) out[where[j]!] = cleaned[j]!;
      yield Buffer.from(out.buffer, out.byteOffset, out.byteLength);
      if (t % 16 === 0) input.onProgress?.(50 + (50 * t) / T);
    }
  }
  await pipeline(volumes, createGzip({ level: 6 }), counter, createWriteStream(input.outPath));
  input.onProgress?.(100);
  return { sha256: hash.digest('hex'), bytes, volumes: T, voxelsRegressed: V, columns: design.columns };
}
