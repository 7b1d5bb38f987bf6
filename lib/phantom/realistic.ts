// The realistic phantom model: 27 sources (13 networks, 14 kinds of noise a rater must recognise) in
// Gaussian-smoothed, temporally autocorrelated noise, so that the eigenvalue spectrum decays
// smoothly with no elbow, as in real runs (see /work/shared/REAL-DATA.md in the project notes).
import type { HeadModel } from './head-model';
import { BRAIN_SEMI_AXES_MM, TISSUE } from './head-model';
import type { MotionParameters } from './motion';
import { rimTimecourse } from './motion';
import { childSeed, createRng, type Rng } from '@/lib/random';
import { belowSurface, blobMap, grid, normaliseMap, type Grid } from './sources';
import { bandLimitedNoise, scale, sliceDropout, zscore } from './time-courses';
import type { PhantomSource } from './types';

/** Noise SD after smoothing, as a fraction of the grey-matter baseline (tSNR ≈ 100, raw 3 T EPI-like). */
export const REALISTIC_NOISE_FRACTION = 0.01;
/** Gaussian SD (voxels) of the noise's spatial smoothing: FWHM = 2.35 voxels (REAL-DATA.md: 1.5–3). */
export const NOISE_SMOOTHING_SIGMA_VOXELS = 1;
/** Range of the noise's lag-1 temporal autocorrelation (AR(1), varies smoothly over the head; REAL-DATA.md: 0.2–0.5 at TR 2 s). */
export const NOISE_AR1: [number, number] = [0.2, 0.45];

/** Thirteen invented networks: directions from the head centre of each grey-matter blob, blob SD in mm. */
export const REALISTIC_NETWORKS: Array<{ name: string; blobs: Array<[number, number, number]>; sigmaMm: number }> = [
  { name: 'medial visual network', blobs: [[0, -1, 0.1]], sigmaMm: 12 },
  {
    name: 'lateral visual network',
    blobs: [
      [-0.6, -0.85, 0.1],
      [0.6, -0.85, 0.1],
    ],
    sigmaMm: 10,
  },
  {
    name: 'sensorimotor network',
    blobs: [
      [-0.55, -0.2, 0.8],
      [0.55, -0.2, 0.8],
    ],
    sigmaMm: 11,
  },
  { name: 'supplementary motor network', blobs: [[0, 0.1, 1]], sigmaMm: 10 },
  {
    name: 'posterior default-mode network',
    blobs: [
      [0, -0.7, 0.7],
      [-0.75, -0.6, 0.35],
      [0.75, -0.6, 0.35],
    ],
    sigmaMm: 10,
  },
  {
    name: 'anterior default-mode network',
    blobs: [
      [0, 0.95, 0.15],
      [0, 0.75, 0.6],
    ],
    sigmaMm: 10,
  },
  {
    name: 'auditory network',
    blobs: [
      [-1, -0.1, 0.05],
      [1, -0.1, 0.05],
    ],
    sigmaMm: 10,
  },
  {
    name: 'left fronto-parietal network',
    blobs: [
      [-0.8, 0.55, 0.35],
      [-0.65, -0.45, 0.65],
    ],
    sigmaMm: 10,
  },
  {
    name: 'right fronto-parietal network',
    blobs: [
      [0.8, 0.55, 0.35],
      [0.65, -0.45, 0.65],
    ],
    sigmaMm: 10,
  },
  {
    name: 'salience network',
    blobs: [
      [-0.65, 0.45, -0.05],
      [0.65, 0.45, -0.05],
      [0, 0.55, 0.75],
    ],
    sigmaMm: 9,
  },
  {
    name: 'dorsal attention network',
    blobs: [
      [-0.4, -0.55, 0.9],
      [0.4, -0.55, 0.9],
    ],
    sigmaMm: 9,
  },
  {
    name: 'temporal pole network',
    blobs: [
      [-0.85, 0.45, -0.55],
      [0.85, 0.45, -0.55],
    ],
    sigmaMm: 9,
  },
  {
    name: 'inferior posterior network',
    blobs: [
      [-0.5, -0.8, -0.65],
      [0.5, -0.8, -0.65],
    ],
    sigmaMm: 10,
  },
];

/** SD of each time course as a fraction of the local baseline at map weight 1 (spikes/dropouts: depth). */
export const REALISTIC_AMPLITUDE = {
  network: [0.02, 0.032] as [number, number],
  rim: 0.03,
  pulsation: 0.04,
  vascular: 0.035,
  drift: 0.02,
  step: 0.035,
  slice: 0.06,
  spike: 0.12,
  susceptibility: 0.03,
};

interface Ctx {
  head: HeadModel;
  g: Grid;
  s: number;
  nv: number;
  nt: number;
  tr: number;
  meanVoxel: number;
}

/** Fills a map from w(idx, x, y, z, tissue, depthMm) over brain voxels; returns it normalised (peak |w| = 1). */
function brainMap(c: Ctx, w: (x: number, y: number, z: number, tissue: number, depth: number) => number): Float32Array {
  const { g, head } = c;
  const map = new Float32Array(c.nv);
  for (let k = 0; k < g.nz; k++)
    for (let j = 0; j < g.ny; j++)
      for (let i = 0; i < g.nx; i++) {
        const idx = i + g.nx * (j + g.ny * k);
        if (!head.brainMask[idx]) continue;
        map[idx] = w(g.xs[i], g.ys[j], g.zs[k], head.tissue[idx], head.depthMm[idx]);
      }
  return normaliseMap(map);
}

/** Gaussian blobs at `depthMm` below the surface in each direction, over every brain tissue. */
function softBlobs(c: Ctx, dirs: Array<[number, number, number]>, depthMm: number, sigmaMm: number): Float32Array {
  const centres = dirs.map((d) => belowSurface(d, depthMm, c.s));
  const sg = sigmaMm * c.s;
  return brainMap(c, (x, y, z) => {
    let w = 0;
    for (const p of centres) w += Math.exp(-((x - p[0]) ** 2 + (y - p[1]) ** 2 + (z - p[2]) ** 2) / (2 * sg * sg));
    return w;
  });
}

/** Framewise displacement (Power et al. 2012: rotations as arc on a 50 mm sphere), length nt, 0 at t = 0. */
function framewiseDisplacement(m: MotionParameters): Float64Array {
  const nt = m.translations[0].length;
  const out = new Float64Array(nt);
  for (let t = 1; t < nt; t++) {
    let fd = 0;
    for (let a = 0; a < 3; a++)
      fd += Math.abs(m.translations[a][t] - m.translations[a][t - 1]) + 50 * Math.abs(m.rotations[a][t] - m.rotations[a][t - 1]);
    out[t] = fd;
  }
  return out;
}

/** z-score of a + b·(band-limited noise): mixes a regressor with independent variation. */
function mix(a: Float64Array, noise: Float64Array, weight: number): Float64Array {
  const out = zscore(Float64Array.from(a));
  for (let t = 0; t < out.length; t++) out[t] += weight * noise[t];
  return zscore(out);
}

export interface RealisticSourcesInput {
  head: HeadModel;
  nt: number;
  trSeconds: number;
  motion: MotionParameters;
  motionScale: number;
  seed: number;
}

/**
 * The 27 truth sources of the realistic model. Signal: 13 networks (grey-matter blobs, time courses
 * 0.01–0.09 Hz, 1/f-like). Noise: two signed motion rims (left/right and top/bottom, opposite signs on
 * opposite sides), ventricular and brainstem pulsation (narrow bands near 0.2 and 0.17 Hz, aliased
 * cardiac/respiratory-like), sagittal and transverse sinus strips, a white-matter drift and a global
 * scanner drift (trend + slow wander), a step (a mean shift after the largest head jerk, anterior
 * edge), periodic slice dropouts, slice-wise spikes (one mid-run, one in the last volumes), an
 * interleaved-slice artefact following motion, and two susceptibility zones (orbitofrontal, near the
 * ear canals) following head pitch/roll. Each source has a `pattern` label and a noiseKind.
 */
export function buildRealisticSources(input: RealisticSourcesInput): PhantomSource[] {
  const { head, nt, trSeconds: tr, motion, motionScale, seed } = input;
  const g = grid(head);
  const c: Ctx = {
    head,
    g,
    s: head.headScale,
    nv: g.nx * g.ny * g.nz,
    nt,
    tr,
    meanVoxel: (head.voxelSize[0] + head.voxelSize[1] + head.voxelSize[2]) / 3,
  };
  const rngFor = (label: string): Rng => createRng(childSeed(seed, `realistic ${label}`));
  const [A, B, C] = BRAIN_SEMI_AXES_MM.map((v) => v * c.s);
  const mv = c.meanVoxel;
  const amp = REALISTIC_AMPLITUDE;
  const out: PhantomSource[] = [];

  for (const net of REALISTIC_NETWORKS) {
    const rng = rngFor(net.name);
    const centres = net.blobs.map((d) => belowSurface(d, 6, c.s).map((v) => v + rng.gauss() * 2 * c.s) as [number, number, number]);
    const map = normaliseMap(blobMap(head, g, centres, net.sigmaMm * c.s * rng.uniform(0.9, 1.1)));
    const tc = scale(bandLimitedNoise(nt, tr, 0.01, 0.09, rng, 1), rng.uniform(...amp.network));
    out.push({ name: net.name, kind: 'signal', pattern: 'network', map, timecourse: tc });
  }

  const fd = framewiseDisplacement(motion);
  {
    const rng = rngFor('rim lr');
    const phase = rng.uniform(-0.3, 0.3);
    const map = brainMap(c, (x, y, _z, _t, d) => (d > 1.5 * mv ? 0 : Math.exp(-d / (0.7 * mv)) * Math.cos(Math.atan2(y, x) + phase)));
    out.push({
      name: 'motion rim (left–right)',
      kind: 'noise',
      noiseKind: 'motion',
      pattern: 'rim',
      map,
      timecourse: rimTimecourse(motion, amp.rim, motionScale, rng),
    });
  }
  {
    const rng = rngFor('rim is');
    const map = brainMap(c, (_x, _y, z, _t, d) => (d > 1.5 * mv ? 0 : Math.exp(-d / (0.7 * mv)) * (z / C)));
    out.push({
      name: 'motion rim (top–bottom)',
      kind: 'noise',
      noiseKind: 'motion',
      pattern: 'rim',
      map,
      timecourse: rimTimecourse(motion, amp.rim, motionScale, rng),
    });
  }
  {
    const rng = rngFor('ventricles');
    const map = brainMap(c, (_x, _y, _z, t) => (t === TISSUE.csf ? 1 : 0));
    const f = rng.uniform(0.2, 0.24);
    out.push({
      name: 'ventricular pulsation',
      kind: 'noise',
      noiseKind: 'pulsation',
      pattern: 'pulsation',
      map,
      timecourse: scale(bandLimitedNoise(nt, tr, f - 0.008, f + 0.008, rng), amp.pulsation),
    });
  }
  {
    const rng = rngFor('brainstem');
    const sg = 9 * c.s;
    const cz = -0.75 * C,
      cy = -0.15 * B;
    const map = brainMap(c, (x, y, z) => Math.exp(-(x * x + (y - cy) ** 2 + (z - cz) ** 2) / (2 * sg * sg)));
    const f = rng.uniform(0.15, 0.18);
    out.push({
      name: 'brainstem pulsation',
      kind: 'noise',
      noiseKind: 'pulsation',
      pattern: 'pulsation',
      map,
      timecourse: scale(bandLimitedNoise(nt, tr, f - 0.01, f + 0.01, rng), amp.pulsation),
    });
  }
  {
    const rng = rngFor('sagittal');
    const halfWidth = Math.max(4 * c.s, 0.6 * head.voxelSize[0]);
    const map = brainMap(c, (x, _y, z, _t, d) =>
      z < 5 * c.s || Math.abs(x) > halfWidth || d > 1.2 * mv ? 0 : Math.exp(-d / mv) * (1 - (0.5 * Math.abs(x)) / halfWidth),
    );
    out.push({
      name: 'sagittal sinus',
      kind: 'noise',
      noiseKind: 'vascular',
      pattern: 'vascular',
      map,
      timecourse: scale(bandLimitedNoise(nt, tr, 0.05, 0.2, rng), amp.vascular),
    });
  }
  {
    const rng = rngFor('transverse');
    const map = brainMap(c, (_x, y, z, _t, d) => (y > -0.55 * B || z > 0.05 * C || z < -0.45 * C || d > 1.2 * mv ? 0 : Math.exp(-d / mv)));
    out.push({
      name: 'transverse sinus',
      kind: 'noise',
      noiseKind: 'vascular',
      pattern: 'vascular',
      map,
      timecourse: scale(bandLimitedNoise(nt, tr, 0.04, 0.16, rng), amp.vascular),
    });
  }
  {
    const rng = rngFor('white matter');
    const cx = rng.uniform(-20, 20) * c.s,
      cy = rng.uniform(-30, 30) * c.s,
      cz = rng.uniform(-5, 20) * c.s;
    const sg = 28 * c.s;
    const map = brainMap(c, (x, y, z, t) =>
      t === TISSUE.white ? Math.exp(-((x - cx) ** 2 + (y - cy) ** 2 + (z - cz) ** 2) / (2 * sg * sg)) : 0,
    );
    const slow = bandLimitedNoise(nt, tr, 0.002, 0.02, rng, 1);
    const sign = rng.next() < 0.5 ? -1 : 1;
    for (let t = 0; t < nt; t++) slow[t] += (sign * (t - (nt - 1) / 2)) / Math.max(1, nt / 3.5);
    out.push({
      name: 'white-matter drift',
      kind: 'noise',
      noiseKind: 'white-matter',
      pattern: 'drift',
      map,
      timecourse: scale(zscore(slow), amp.drift),
    });
  }
  {
    // Scanner drift: the whole brain, stronger on one side (coil-like), linear + quadratic trend.
    const rng = rngFor('scanner drift');
    const map = brainMap(c, (x, y) => 0.55 + 0.45 * (0.7 * (x / A) + 0.3 * (y / B)));
    const tc = new Float64Array(nt);
    const q = rng.uniform(-1, 1);
    for (let t = 0; t < nt; t++) {
      const u = (2 * t) / Math.max(1, nt - 1) - 1;
      tc[t] = u + q * (u * u - 1 / 3);
    }
    out.push({
      name: 'scanner drift',
      kind: 'noise',
      noiseKind: 'scanner',
      pattern: 'drift',
      map,
      timecourse: scale(zscore(tc), amp.drift),
    });
  }
  {
    // Step: the anterior-superior edge shifts its mean after the largest head jerk (a new head position).
    const rng = rngFor('step');
    let tJump = Math.floor(nt * rng.uniform(0.35, 0.65));
    let best = 0;
    for (let t = Math.floor(nt * 0.2); t < Math.ceil(nt * 0.8); t++)
      if (fd[t] > best) {
        best = fd[t];
        tJump = t;
      }
    const map = brainMap(c, (_x, y, z, _t, d) =>
      y < 0 || z < -0.2 * C || d > 3 * mv ? 0 : Math.exp(-d / (1.5 * mv)) * (0.5 + (0.5 * y) / B),
    );
    const tc = new Float64Array(nt);
    for (let t = tJump; t < nt; t++) tc[t] = 1;
    out.push({
      name: 'step after head jerk',
      kind: 'noise',
      noiseKind: 'motion',
      pattern: 'step',
      map,
      timecourse: scale(zscore(tc), amp.step),
    });
  }
  const sliceAt = (f: number) => Math.max(1, Math.min(g.nz - 2, Math.round(g.nz * f)));
  const sliceMap = (z0: number) => brainMap(c, (_x, _y, z) => (Math.abs(z - g.zs[z0]) < 1e-6 ? 1 : 0));
  {
    const rng = rngFor('slice dropout');
    const z0 = sliceAt(rng.uniform(0.35, 0.5));
    out.push({
      name: `slice ${z0} dropout`,
      kind: 'noise',
      noiseKind: 'scanner',
      pattern: 'slice',
      map: sliceMap(z0),
      timecourse: scale(sliceDropout(nt, 7 + rng.int(6), rng), amp.slice),
    });
  }
  {
    // Slice-wise spikes: one mid-run, one in the last five volumes (so spectra must reach the end).
    const rng = rngFor('spike');
    const z0 = sliceAt(rng.uniform(0.55, 0.7));
    const tc = new Float64Array(nt);
    tc[Math.floor(nt * rng.uniform(0.3, 0.6))] = 1;
    tc[nt - 2 - rng.int(4)] = 0.8;
    out.push({
      name: `slice ${z0} spikes`,
      kind: 'noise',
      noiseKind: 'scanner',
      pattern: 'spike',
      map: sliceMap(z0),
      timecourse: scale(tc, amp.spike),
    });
  }
  {
    // Interleaved acquisition: odd slices brighten after movement (spin-history-like).
    const rng = rngFor('interleaved');
    const map = brainMap(c, (_x, _y, z) => (Math.round((z - g.zs[0]) / head.voxelSize[2]) % 2 === 1 ? 1 : 0));
    const tc = mix(fd, bandLimitedNoise(nt, tr, 0.05, 0.25, rng), 0.6);
    out.push({
      name: 'interleaved-slice artefact',
      kind: 'noise',
      noiseKind: 'scanner',
      pattern: 'slice',
      map,
      timecourse: scale(tc, amp.susceptibility),
    });
  }
  {
    const rng = rngFor('orbitofrontal');
    const map = softBlobs(c, [[0, 0.9, -0.55]], 5, 10);
    const tc = mix(motion.rotations[0], bandLimitedNoise(nt, tr, 0.01, 0.1, rng, 1), 0.7);
    out.push({
      name: 'orbitofrontal susceptibility',
      kind: 'noise',
      noiseKind: 'susceptibility',
      pattern: 'susceptibility',
      map,
      timecourse: scale(tc, amp.susceptibility),
    });
  }
  {
    const rng = rngFor('ear canals');
    const map = softBlobs(
      c,
      [
        [-0.95, 0.1, -0.6],
        [0.95, 0.1, -0.6],
      ],
      5,
      9,
    );
    const tc = mix(motion.rotations[1], bandLimitedNoise(nt, tr, 0.01, 0.12, rng, 1), 0.7);
    out.push({
      name: 'temporal susceptibility',
      kind: 'noise',
      noiseKind: 'susceptibility',
      pattern: 'susceptibility',
      map,
      timecourse: scale(tc, amp.susceptibility),
    });
  }
  return out;
}

/** Normalised 1D Gaussian kernel of SD `sigma` (samples), half-width ⌈3σ⌉. */
export function gaussianKernel(sigma: number): Float32Array {
  const h = Math.max(1, Math.ceil(3 * sigma));
  const k = new Float32Array(2 * h + 1);
  let sum = 0;
  for (let i = -h; i <= h; i++) sum += k[i + h] = Math.exp(-(i * i) / (2 * sigma * sigma));
  for (let i = 0; i < k.length; i++) k[i] /= sum;
  return k;
}

/**
 * In-place separable convolution of one 3D volume (x fastest) with the same odd-length kernel along
 * x, y and z; indices beyond the border are clamped (edge value repeated). scratch: length ≥ max(nx, ny, nz).
 */
export function smoothSeparable(
  vol: Float32Array,
  dims: [number, number, number],
  kernel: Float32Array,
  scratch = new Float32Array(Math.max(...dims)),
): void {
  const [nx, ny, nz] = dims;
  const h = (kernel.length - 1) / 2;
  const line = (start: number, stride: number, n: number) => {
    for (let i = 0; i < n; i++) scratch[i] = vol[start + i * stride];
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let q = -h; q <= h; q++) {
        const j = i + q < 0 ? 0 : i + q >= n ? n - 1 : i + q;
        s += kernel[q + h] * scratch[j];
      }
      vol[start + i * stride] = s;
    }
  };
  for (let z = 0; z < nz; z++) for (let y = 0; y < ny; y++) line(nx * (y + ny * z), 1, nx);
  for (let z = 0; z < nz; z++) for (let x = 0; x < nx; x++) line(x + nx * ny * z, nx, ny);
  if (nz > 1) for (let y = 0; y < ny; y++) for (let x = 0; x < nx; x++) line(x + nx * y, nx * ny, nz);
}

/**
 * Per-voxel AR(1) coefficient of the noise: varies smoothly over the volume between NOISE_AR1[0]
 * and NOISE_AR1[1] (a low-frequency pattern, so neighbouring voxels share their temporal colour).
 */
export function noiseAr1Field(dims: [number, number, number], rng: Rng): Float32Array {
  const [nx, ny, nz] = dims;
  const [lo, hi] = NOISE_AR1;
  const ph = [rng.uniform(0, 6.3), rng.uniform(0, 6.3), rng.uniform(0, 6.3)];
  const out = new Float32Array(nx * ny * nz);
  for (let k = 0; k < nz; k++)
    for (let j = 0; j < ny; j++)
      for (let i = 0; i < nx; i++) {
        const u =
          (Math.sin((2 * Math.PI * i) / nx + ph[0]) + Math.sin((2 * Math.PI * j) / ny + ph[1]) + Math.sin((Math.PI * k) / nz + ph[2])) / 3;
        out[i + nx * (j + ny * k)] = lo + (hi - lo) * (0.5 + 0.5 * u);
      }
  return out;
}
