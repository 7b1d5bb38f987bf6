// The phantom's anatomy: an ellipsoid brain (grey ribbon, white core, lateral ventricles) inside a
// dark skull gap and a scalp shell, with a baseline intensity per tissue. No randomness: the same
// size always gives the same head, so mask sizes can be tested without generating any data.
import { sizeSpec } from './sizes';
import type { PhantomSize } from './types';

export const TISSUE = { outside: 0, grey: 1, white: 2, csf: 3 } as const;

/** Baseline intensities (arbitrary scanner units, T2*-weighted look: CSF brightest). */
export const BASELINE = { grey: 820, white: 640, csf: 1100, skull: 50, scalp: 380, background: 0 } as const;

/** Brain semi-axes in mm (x left–right, y posterior–anterior, z inferior–superior) before headScale. */
export const BRAIN_SEMI_AXES_MM: [number, number, number] = [72, 90, 64];

export interface HeadModel {
  size: PhantomSize;
  dims: [number, number, number];
  voxelSize: [number, number, number];
  /** 4×4 row-major voxel→mm; world origin at the head centre. */
  affine: number[][];
  headScale: number;
  /** 3D (x fastest): 0 outside the brain, 1 grey, 2 white, 3 CSF. */
  tissue: Uint8Array;
  /** 3D: 1 where tissue > 0. */
  brainMask: Uint8Array;
  /** 3D: 1 inside the outer scalp surface (brain, skull gap, scalp). */
  headMask: Uint8Array;
  /** 3D: depth below the brain surface in mm (≥ 0 inside the brain), negative outside (distance out). */
  depthMm: Float32Array;
  /** 3D: baseline image intensity including a smooth coil-sensitivity bias field. */
  baseline: Float32Array;
  brainVoxels: number;
}

/** World coordinate (mm) of voxel index i along axis `axis` for a grid centred on the origin. */
export function voxelToMm(i: number, n: number, voxelMm: number): number {
  return (i - (n - 1) / 2) * voxelMm;
}

/**
 * Builds the head model of a size: for each voxel, the normalised ellipsoid radius r and the
 * distance to the brain surface along the ray from the centre, |p|·(1/r − 1) mm (positive inside);
 * grey where that depth is below a gently undulating ribbon thickness (≈ 7–17 mm, thick as it looks at fMRI resolution), CSF in two
 * lateral-ventricle ellipsoids, white elsewhere in the brain; skull gap 0–3 mm and scalp 3–8 mm
 * outside (× headScale). Arrays are 3D, x fastest.
 */
export function headModel(size: PhantomSize): HeadModel {
  const spec = sizeSpec(size);
  const [nx, ny, nz] = spec.dims;
  const [vx, vy, vz] = spec.voxelSize;
  const s = spec.headScale;
  const [a, b, c] = BRAIN_SEMI_AXES_MM.map((v) => v * s);
  const nv = nx * ny * nz;
  const tissue = new Uint8Array(nv);
  const brainMask = new Uint8Array(nv);
  const headMask = new Uint8Array(nv);
  const depthMm = new Float32Array(nv);
  const baseline = new Float32Array(nv);
  const ventricles = [-1, 1].map((side) => ({ cx: side * 11 * s, cy: -4 * s, cz: 12 * s, ax: 8 * s, ay: 28 * s, az: 11 * s }));
  let brainVoxels = 0;
  for (let k = 0; k < nz; k++) {
    const z = voxelToMm(k, nz, vz);
    for (let j = 0; j < ny; j++) {
      const y = voxelToMm(j, ny, vy);
      for (let i = 0; i < nx; i++) {
        const x = voxelToMm(i, nx, vx);
        const idx = i + nx * (j + ny * k);
        // Slightly flatter underside (the brain's base) than top.
        const cz = z < 0 ? c * 0.94 : c;
        const r = Math.sqrt((x / a) ** 2 + (y / b) ** 2 + (z / cz) ** 2);
        const dist = Math.hypot(x, y, z);
        const depth = r > 1e-9 ? dist * (1 / r - 1) : Math.min(a, b, cz);
        depthMm[idx] = depth;
        const bias = 1 + 0.06 * (x / a) - 0.05 * (y / b) + 0.04 * (z / c);
        if (depth >= 0) {
          brainMask[idx] = 1;
          brainVoxels++;
          const az = Math.atan2(y, x);
          const el = Math.atan2(z, Math.hypot(x, y));
          const ribbon = (12 + 5 * Math.sin(6 * az) * Math.cos(5 * el)) * s;
          let t: number = depth < ribbon ? TISSUE.grey : TISSUE.white;
          for (const v of ventricles) {
            if (((x - v.cx) / v.ax) ** 2 + ((y - v.cy) / v.ay) ** 2 + ((z - v.cz) / v.az) ** 2 <= 1) t = TISSUE.csf;
          }
          tissue[idx] = t;
          const base = t === TISSUE.grey ? BASELINE.grey : t === TISSUE.white ? BASELINE.white : BASELINE.csf;
          baseline[idx] = base * bias;
          headMask[idx] = 1;
        } else if (depth > -3 * s) {
          baseline[idx] = BASELINE.skull * bias;
          headMask[idx] = 1;
        } else if (depth > -8 * s) {
          baseline[idx] = BASELINE.scalp * bias;
          headMask[idx] = 1;
        }
      }
    }
  }
  const affine = [
    [vx, 0, 0, -((nx - 1) / 2) * vx],
    [0, vy, 0, -((ny - 1) / 2) * vy],
    [0, 0, vz, -((nz - 1) / 2) * vz],
    [0, 0, 0, 1],
  ];
  return {
    size,
    dims: [nx, ny, nz],
    voxelSize: [vx, vy, vz],
    affine,
    headScale: s,
    tissue,
    brainMask,
    headMask,
    depthMm,
    baseline,
    brainVoxels,
  };
}
