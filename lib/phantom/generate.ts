// Generates a synthetic 4D fMRI run, volume by volume, straight into one Float32Array.
import { headModel } from './head-model';
import { simulateMotion } from './motion';
import { childSeed, createRng } from '@/lib/random';
import { normalQuantileTable } from './normal-quantiles';
import { sizeSpec } from './sizes';
import {
  buildRealisticSources,
  gaussianKernel,
  NOISE_SMOOTHING_SIGMA_VOXELS,
  noiseAr1Field,
  REALISTIC_NOISE_FRACTION,
  smoothSeparable,
} from './realistic';
import { buildSources, MAP_FLOOR } from './sources';
import type { Phantom, PhantomModel, PhantomOptions } from './types';

/** Thermal-noise SD after smoothing, as a fraction of the grey-matter baseline (tSNR ≈ 120). */
export const THERMAL_NOISE_FRACTION = 0.008;
/** Mild separable smoothing kernel applied to the thermal noise along each axis. */
const KERNEL: [number, number, number] = [0.15, 0.7, 0.15];
const TABLE_SIZE = 8192;

/**
 * In-place separable 3-tap smoothing of one 3D volume (x fastest): v[i] ← k0·v[i−1] + k1·v[i] +
 * k2·v[i+1] along x, then y, then z, with the edge value repeated at the borders. Inner loops run
 * over contiguous memory; scratch is one row and one plane of the original values.
 */
export function smooth3(vol: Float32Array, dims: [number, number, number], k: [number, number, number]): void {
  const [nx, ny, nz] = dims;
  const [k0, k1, k2] = k;
  const plane = nx * ny;
  // x: carry the previous original value along each row.
  for (let row = 0; row < ny * nz; row++) {
    const o = row * nx;
    let prev = vol[o];
    for (let i = 0; i < nx; i++) {
      const cur = vol[o + i];
      const next = i + 1 < nx ? vol[o + i + 1] : cur;
      vol[o + i] = k0 * prev + k1 * cur + k2 * next;
      prev = cur;
    }
  }
  // y: keep the previous original row.
  const prevRow = new Float32Array(nx);
  for (let z = 0; z < nz; z++) {
    const oz = z * plane;
    prevRow.set(vol.subarray(oz, oz + nx));
    for (let y = 0; y < ny; y++) {
      const o = oz + y * nx;
      const on = y + 1 < ny ? o + nx : o;
      for (let i = 0; i < nx; i++) {
        const cur = vol[o + i];
        vol[o + i] = k0 * prevRow[i] + k1 * cur + k2 * vol[on + i];
        prevRow[i] = cur;
      }
    }
  }
  // z: keep the previous original plane.
  if (nz < 2) return;
  const prevPlane = vol.slice(0, plane);
  for (let z = 0; z < nz; z++) {
    const o = z * plane;
    const on = z + 1 < nz ? o + plane : o;
    for (let i = 0; i < plane; i++) {
      const cur = vol[o + i];
      vol[o + i] = k0 * prevPlane[i] + k1 * cur + k2 * vol[on + i];
      prevPlane[i] = cur;
    }
  }
}

/**
 * Generates a phantom run (see Phantom). For each volume t, in file order (x fastest, then y, z, t):
 * data = |baseline·(1 + Σ_s map_s·tc_s[t]) + smooth(σ0·n)|, n ≈ N(0, 1) from a quantile table, with σ0 chosen so the smoothed noise
 * has SD THERMAL_NOISE_FRACTION × the grey baseline; the absolute value mimics a magnitude image
 * (only matters outside the head, where the baseline is 0). Sources are applied from sparse index
 * lists, so cost is O(voxels·volumes) and memory one 4D Float32Array plus a few 3D arrays.
 * Deterministic under `seed`.
 */
export function generatePhantom(opts: PhantomOptions): Phantom {
  const spec = sizeSpec(opts.size);
  const seed = opts.seed ?? 1;
  const nt = opts.volumes ?? spec.volumes;
  if (!Number.isInteger(nt) || nt < 8) throw new Error(`volumes must be an integer ≥ 8; got ${opts.volumes}.`);
  const motionScale = opts.motionScale ?? 1;
  if (!(motionScale >= 0)) throw new Error(`motionScale must be ≥ 0; got ${opts.motionScale}.`);
  const tr = spec.trSeconds;
  const head = headModel(opts.size);
  const [nx, ny, nz] = head.dims;
  const nv = nx * ny * nz;

  const model: PhantomModel = opts.model ?? (opts.size === 'tiny' || opts.size === 'small' ? 'classic' : 'realistic');
  if (model !== 'classic' && model !== 'realistic') throw new Error(`Unknown phantom model "${String(model)}"; use classic or realistic.`);
  const realistic = model === 'realistic';
  const motion = simulateMotion(nt, tr, motionScale, createRng(childSeed(seed, 'motion')));
  const sourceInput = { head, nt, trSeconds: tr, motion, motionScale, seed };
  const sources = realistic ? buildRealisticSources(sourceInput) : buildSources(sourceInput);
  const sparse = sources.map((src) => {
    let n = 0;
    for (let i = 0; i < nv; i++) if (Math.abs(src.map[i]) >= MAP_FLOOR) n++;
    const idx = new Uint32Array(n);
    const gain = new Float32Array(n); // baseline × weight
    n = 0;
    for (let i = 0; i < nv; i++) {
      if (Math.abs(src.map[i]) < MAP_FLOOR) continue;
      idx[n] = i;
      gain[n++] = head.baseline[i] * src.map[i];
    }
    return { idx, gain, tc: src.timecourse };
  });

  const gk = gaussianKernel(NOISE_SMOOTHING_SIGMA_VOXELS);
  let k2 = KERNEL[0] ** 2 + KERNEL[1] ** 2 + KERNEL[2] ** 2;
  if (realistic) k2 = gk.reduce((a, v) => a + v * v, 0);
  const sigma0 = ((realistic ? REALISTIC_NOISE_FRACTION : THERMAL_NOISE_FRACTION) * 820) / Math.sqrt(k2 * k2 * k2);
  const data = new Float32Array(nv * nt);
  const rng = createRng(childSeed(seed, 'thermal'));
  const table = normalQuantileTable(TABLE_SIZE);
  for (let i = 0; i < TABLE_SIZE; i++) table[i] *= sigma0;
  const base = head.baseline;
  // Realistic model: AR(1) noise n_t = ρ n_{t−1} + √(1 − ρ²) u_t per voxel (u_t the smoothed
  // innovation volume), so the stationary SD equals the innovations' and lag-1 autocorrelation is ρ.
  const rho = realistic ? noiseAr1Field(head.dims, createRng(childSeed(seed, 'noise colour'))) : null;
  const prev = realistic ? new Float32Array(nv) : null;
  const scratch = new Float32Array(Math.max(nx, ny, nz));
  for (let t = 0; t < nt; t++) {
    const vol = data.subarray(t * nv, (t + 1) * nv);
    // Approximately normal samples from a quantile table (see normalQuantileTable), scaled by σ0.
    for (let i = 0; i < nv; i++) vol[i] = table[(rng.next() * TABLE_SIZE) | 0];
    if (rho && prev) {
      smoothSeparable(vol, head.dims, gk, scratch);
      if (t > 0) for (let i = 0; i < nv; i++) vol[i] = rho[i] * prev[i] + Math.sqrt(1 - rho[i] * rho[i]) * vol[i];
      prev.set(vol);
    } else {
      smooth3(vol, head.dims, KERNEL);
    }
    for (let i = 0; i < nv; i++) vol[i] += base[i];
    for (const sp of sparse) {
      const c = sp.tc[t];
      if (c === 0) continue;
      const { idx, gain } = sp;
      for (let n = 0; n < idx.length; n++) vol[idx[n]] += gain[n] * c;
    }
    for (let i = 0; i < nv; i++) if (vol[i] < 0) vol[i] = -vol[i];
  }

  return {
    dims: [nx, ny, nz, nt],
    voxelSize: head.voxelSize,
    trSeconds: tr,
    affine: head.affine,
    data,
    truth: { sources, brainMask: head.brainMask, tissue: head.tissue },
    motion,
    seed,
    size: opts.size,
    model,
  };
}
