// The phantom's ground-truth sources: spatial maps (full 3D weights) with their time courses.
import type { HeadModel } from './head-model';
import { BRAIN_SEMI_AXES_MM, TISSUE, voxelToMm } from './head-model';
import type { MotionParameters } from './motion';
import { rimTimecourse } from './motion';
import { childSeed, createRng, type Rng } from '@/lib/random';
import { bandLimitedNoise, scale, sliceDropout, zscore } from './time-courses';
import type { PhantomSource } from './types';

/**
 * Source amplitudes: SD of each time course as a fraction of the local baseline at map weight 1
 * (the slice entry is the dropout depth). Chosen so spatial ICA recovers every source at these
 * sizes while thermal noise (generate.ts) stays at a realistic level.
 */
export const AMPLITUDE = {
  network: [0.03, 0.04] as [number, number],
  rim: 0.035,
  pulsation: 0.045,
  vascular: 0.04,
  whiteMatter: 0.02,
  sliceDropout: 0.08,
};

/** Maps are zeroed below this |weight| so they are sparse (heavy-tailed, as spatial ICA needs). */
export const MAP_FLOOR = 0.01;

interface NetworkSpec {
  name: string;
  /** Directions from the head centre (unitless) of each blob; the blob sits 6 mm below the surface there. */
  blobs: Array<[number, number, number]>;
  /** Blob SD in mm (before headScale). */
  sigmaMm: number;
}

/** Five invented resting-state-like networks, 1–4 grey-matter blobs each. */
export const NETWORKS: NetworkSpec[] = [
  { name: 'visual network', blobs: [[0, -1, 0.1]], sigmaMm: 14 },
  {
    name: 'sensorimotor network',
    blobs: [
      [-0.55, -0.2, 0.8],
      [0.55, -0.2, 0.8],
    ],
    sigmaMm: 12,
  },
  {
    name: 'default-mode network',
    blobs: [
      [0, -0.7, 0.7],
      [0, 0.95, 0.15],
      [-0.7, -0.6, 0.4],
      [0.7, -0.6, 0.4],
    ],
    sigmaMm: 11,
  },
  {
    name: 'auditory network',
    blobs: [
      [-1, -0.1, 0.05],
      [1, -0.1, 0.05],
    ],
    sigmaMm: 11,
  },
  {
    name: 'left fronto-parietal network',
    blobs: [
      [-0.75, 0.55, 0.35],
      [-0.7, -0.55, 0.55],
    ],
    sigmaMm: 12,
  },
];

export interface Grid {
  nx: number;
  ny: number;
  nz: number;
  xs: Float64Array;
  ys: Float64Array;
  zs: Float64Array;
}

export function grid(head: HeadModel): Grid {
  const [nx, ny, nz] = head.dims;
  const axis = (n: number, v: number) => Float64Array.from({ length: n }, (_, i) => voxelToMm(i, n, v));
  return { nx, ny, nz, xs: axis(nx, head.voxelSize[0]), ys: axis(ny, head.voxelSize[1]), zs: axis(nz, head.voxelSize[2]) };
}

/** Point (mm) `depthMm` below the brain ellipsoid surface in direction d (ignores the flattened base). */
export function belowSurface(d: [number, number, number], depthMm: number, s: number): [number, number, number] {
  const [a, b, c] = BRAIN_SEMI_AXES_MM.map((v) => v * s);
  const r = Math.sqrt((d[0] / a) ** 2 + (d[1] / b) ** 2 + (d[2] / c) ** 2);
  const surf = d.map((v) => v / r) as [number, number, number];
  const len = Math.hypot(...surf);
  const f = Math.max(0, 1 - (depthMm * s) / len);
  return surf.map((v) => v * f) as [number, number, number];
}

/** Rescales a map so max |w| = 1 and zeroes weights below MAP_FLOOR (in place). */
export function normaliseMap(map: Float32Array): Float32Array {
  let peak = 0;
  for (let i = 0; i < map.length; i++) peak = Math.max(peak, Math.abs(map[i]));
  if (peak === 0) return map;
  for (let i = 0; i < map.length; i++) {
    const w = map[i] / peak;
    map[i] = Math.abs(w) < MAP_FLOOR ? 0 : w;
  }
  return map;
}

/**
 * Gaussian blobs exp(−|p − c|² / 2σ²) summed over centres, weighted by tissue (grey 1, white 0.1,
 * CSF and outside 0), truncated beyond 3σ. Returns a 3D map (x fastest), not yet normalised.
 */
export function blobMap(head: HeadModel, g: Grid, centres: Array<[number, number, number]>, sigma: number): Float32Array {
  const map = new Float32Array(g.nx * g.ny * g.nz);
  const cut = 9 * sigma * sigma;
  for (let k = 0; k < g.nz; k++) {
    for (let j = 0; j < g.ny; j++) {
      for (let i = 0; i < g.nx; i++) {
        const idx = i + g.nx * (j + g.ny * k);
        const t = head.tissue[idx];
        if (t !== TISSUE.grey && t !== TISSUE.white) continue;
        let w = 0;
        for (const c of centres) {
          const d2 = (g.xs[i] - c[0]) ** 2 + (g.ys[j] - c[1]) ** 2 + (g.zs[k] - c[2]) ** 2;
          if (d2 < cut) w += Math.exp(-d2 / (2 * sigma * sigma));
        }
        map[idx] = w * (t === TISSUE.grey ? 1 : 0.1);
      }
    }
  }
  return map;
}

export interface BuildSourcesInput {
  head: HeadModel;
  nt: number;
  trSeconds: number;
  motion: MotionParameters;
  motionScale: number;
  seed: number;
}

/**
 * Builds every truth source for one run. Time courses are fractional signal changes (see
 * PhantomSource; amplitudes in AMPLITUDE): networks 0.01–0.09 Hz (1/f-like); rim from the motion;
 * ventricular pulsation narrow-band at a per-run 0.20–0.24 Hz; sagittal-sinus strip broadband
 * 0.05–0.2 Hz; white-matter drift below 0.02 Hz plus a linear trend; one slice with periodic dropouts.
 */
export function buildSources(input: BuildSourcesInput): PhantomSource[] {
  const { head, nt, trSeconds, motion, motionScale, seed } = input;
  const g = grid(head);
  const s = head.headScale;
  const nv = g.nx * g.ny * g.nz;
  const rngFor = (label: string): Rng => createRng(childSeed(seed, label));
  const meanVoxel = (head.voxelSize[0] + head.voxelSize[1] + head.voxelSize[2]) / 3;
  const sources: PhantomSource[] = [];

  for (const net of NETWORKS) {
    const rng = rngFor(net.name);
    const centres = net.blobs.map((d) => {
      const p = belowSurface(d, 6, s);
      return p.map((v) => v + rng.gauss() * 3 * s) as [number, number, number];
    });
    const sigma = net.sigmaMm * s * rng.uniform(0.9, 1.1);
    const map = normaliseMap(blobMap(head, g, centres, sigma));
    const tc = scale(bandLimitedNoise(nt, trSeconds, 0.01, 0.09, rng, 1), rng.uniform(...AMPLITUDE.network));
    sources.push({ name: net.name, kind: 'signal', map, timecourse: tc });
  }

  {
    // Motion rim: the outermost ≈1.5 voxels of the brain, weight falling with depth, uneven around.
    const rng = rngFor('rim');
    const map = new Float32Array(nv);
    const phase = rng.uniform(0, 2 * Math.PI);
    for (let k = 0; k < g.nz; k++)
      for (let j = 0; j < g.ny; j++)
        for (let i = 0; i < g.nx; i++) {
          const idx = i + g.nx * (j + g.ny * k);
          const d = head.depthMm[idx];
          if (!head.brainMask[idx] || d > 1.5 * meanVoxel) continue;
          const az = Math.atan2(g.ys[j], g.xs[i]);
          map[idx] = Math.exp(-d / (0.7 * meanVoxel)) * (0.75 + 0.25 * Math.cos(2 * az + phase));
        }
    sources.push({
      name: 'motion rim',
      kind: 'noise',
      noiseKind: 'motion',
      map: normaliseMap(map),
      timecourse: rimTimecourse(motion, AMPLITUDE.rim, motionScale, rng),
    });
  }

  {
    const rng = rngFor('pulsation');
    const map = new Float32Array(nv);
    for (let i = 0; i < nv; i++) if (head.tissue[i] === TISSUE.csf) map[i] = 1;
    const f = rng.uniform(0.2, 0.24);
    const tc = scale(bandLimitedNoise(nt, trSeconds, f - 0.008, f + 0.008, rng), AMPLITUDE.pulsation);
    sources.push({ name: 'ventricular pulsation', kind: 'noise', noiseKind: 'pulsation', map, timecourse: tc });
  }

  {
    // Superior sagittal sinus: a strip along the midline at the top of the brain.
    const rng = rngFor('vascular');
    const map = new Float32Array(nv);
    const halfWidth = Math.max(4 * s, 0.6 * head.voxelSize[0]);
    for (let k = 0; k < g.nz; k++)
      for (let j = 0; j < g.ny; j++)
        for (let i = 0; i < g.nx; i++) {
          const idx = i + g.nx * (j + g.ny * k);
          if (!head.brainMask[idx] || g.zs[k] < 5 * s || Math.abs(g.xs[i]) > halfWidth) continue;
          const d = head.depthMm[idx];
          if (d > 1.2 * meanVoxel) continue;
          map[idx] = Math.exp(-d / meanVoxel) * (1 - (0.5 * Math.abs(g.xs[i])) / halfWidth);
        }
    const tc = scale(bandLimitedNoise(nt, trSeconds, 0.05, 0.2, rng), AMPLITUDE.vascular);
    sources.push({ name: 'sagittal sinus', kind: 'noise', noiseKind: 'vascular', map: normaliseMap(map), timecourse: tc });
  }

  {
    // White-matter drift: a broad soft blob restricted to white matter, very slow time course.
    const rng = rngFor('white-matter');
    const c = [rng.uniform(-20, 20) * s, rng.uniform(-30, 30) * s, rng.uniform(-5, 20) * s];
    const sigma = 28 * s;
    const map = new Float32Array(nv);
    for (let k = 0; k < g.nz; k++)
      for (let j = 0; j < g.ny; j++)
        for (let i = 0; i < g.nx; i++) {
          const idx = i + g.nx * (j + g.ny * k);
          if (head.tissue[idx] !== TISSUE.white) continue;
          const d2 = (g.xs[i] - c[0]) ** 2 + (g.ys[j] - c[1]) ** 2 + (g.zs[k] - c[2]) ** 2;
          map[idx] = Math.exp(-d2 / (2 * sigma * sigma));
        }
    const slow = bandLimitedNoise(nt, trSeconds, 0.002, 0.02, rng, 1);
    const sign = rng.next() < 0.5 ? -1 : 1;
    for (let t = 0; t < nt; t++) slow[t] += (sign * (t - (nt - 1) / 2)) / Math.max(1, nt / 3.5);
    sources.push({
      name: 'white-matter drift',
      kind: 'noise',
      noiseKind: 'white-matter',
      map: normaliseMap(map),
      timecourse: scale(zscore(slow), AMPLITUDE.whiteMatter),
    });
  }

  {
    // Scanner artefact: one slice (per run) with periodic dropouts.
    const rng = rngFor('slice');
    const zSlice = Math.round(g.nz * rng.uniform(0.35, 0.65));
    const map = new Float32Array(nv);
    for (let j = 0; j < g.ny; j++)
      for (let i = 0; i < g.nx; i++) {
        const idx = i + g.nx * (j + g.ny * zSlice);
        if (head.brainMask[idx]) map[idx] = 1;
      }
    const period = 7 + rng.int(6);
    sources.push({
      name: `slice ${zSlice} dropout`,
      kind: 'noise',
      noiseKind: 'scanner',
      map,
      timecourse: scale(sliceDropout(nt, period, rng), AMPLITUDE.sliceDropout),
    });
  }
  return sources;
}
