// Turns a phantom (or its truth maps) into writer input for '@/lib/nifti' (writeNiftiFile).
import type { NiftiWriteInput } from '@/lib/nifti';
import type { Phantom } from './types';

export interface PhantomNiftiOptions {
  /** 'float32' (default) or 'int16' with scl_slope chosen so the maximum fits (1 when it already does). */
  datatype?: 'float32' | 'int16';
  description?: string;
}

/**
 * Writer input for the phantom's 4D data: dims [nx, ny, nz, nt], pixdim voxel sizes (mm) and TR (s),
 * the phantom's affine, mm + s units. float32 shares the phantom's array (no copy); int16 makes one
 * rounded copy, value = stored · scl_slope (slope 1 unless the maximum exceeds 32767).
 */
export function phantomToNiftiInput(p: Phantom, options: PhantomNiftiOptions = {}): NiftiWriteInput {
  const common = {
    dims: [...p.dims],
    pixdim: [...p.voxelSize, p.trSeconds],
    affine: p.affine.map((r) => [...r]),
    xyztUnits: 2 | 8,
    description: options.description ?? `Quorum synthetic phantom ${p.size} seed ${p.seed}`,
  };
  if ((options.datatype ?? 'float32') === 'float32') return { ...common, datatype: 'float32', data: p.data };
  let max = 0;
  for (let i = 0; i < p.data.length; i++) if (p.data[i] > max) max = p.data[i];
  const slope = max > 32767 ? max / 32767 : 1;
  const out = new Int16Array(p.data.length);
  for (let i = 0; i < p.data.length; i++) out[i] = Math.max(-32768, Math.min(32767, Math.round(p.data[i] / slope)));
  return { ...common, datatype: 'int16', data: out, sclSlope: slope, sclInter: 0 };
}

/** Writer input for the truth maps as one 4D float32 image: volume s = source s's map (order of truth.sources). */
export function truthMapsToNiftiInput(p: Phantom): NiftiWriteInput {
  const [nx, ny, nz] = p.dims;
  const nv = nx * ny * nz;
  const ns = p.truth.sources.length;
  const data = new Float32Array(nv * ns);
  p.truth.sources.forEach((s, i) => data.set(s.map, i * nv));
  return {
    dims: [nx, ny, nz, ns],
    pixdim: [...p.voxelSize, 1],
    affine: p.affine.map((r) => [...r]),
    datatype: 'float32',
    data,
    xyztUnits: 2,
    description: `Quorum phantom truth maps ${p.size} seed ${p.seed}`,
  };
}

/** JSON-ready description of the truth: source order matches the truth-maps volumes. */
export function truthSummary(p: Phantom): {
  size: string;
  seed: number;
  trSeconds: number;
  dims: number[];
  model: string;
  /** 'classic' or 'realistic' (see PhantomOptions.model). */
  phantomModel: string;
  sources: Array<{ index: number; name: string; kind: string; noiseKind: string | null; pattern?: string; timecourse: number[] }>;
} {
  return {
    size: p.size,
    seed: p.seed,
    trSeconds: p.trSeconds,
    dims: [...p.dims],
    phantomModel: p.model,
    model:
      'data = baseline * (1 + sum_s map_s * timecourse_s) + smoothed Gaussian noise (realistic model: Gaussian-smoothed, AR(1) in time); timecourse = fractional signal change at map weight 1',
    sources: p.truth.sources.map((s, index) => ({
      index,
      name: s.name,
      kind: s.kind,
      noiseKind: s.noiseKind ?? null,
      ...(s.pattern ? { pattern: s.pattern } : {}),
      timecourse: Array.from(s.timecourse, (v) => Number(v.toPrecision(6))),
    })),
  };
}
