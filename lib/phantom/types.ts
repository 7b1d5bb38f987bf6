// Types of the synthetic fMRI phantom (invented data for tests, benchmarks and the demo).

export type PhantomSize = 'tiny' | 'small' | 'XS' | 'S' | 'M' | 'L';

export type PhantomNoiseKind = 'motion' | 'pulsation' | 'vascular' | 'csf' | 'white-matter' | 'susceptibility' | 'scanner' | 'other';

export interface PhantomOptions {
  size: PhantomSize;
  /** PRNG seed; the same seed gives bit-identical data. Default 1. */
  seed?: number;
  /** Number of volumes; default depends on the size. */
  volumes?: number;
  /** Multiplies the simulated head motion (and so the rim source). Default 1; 0 = no motion. */
  motionScale?: number;
  /**
   * 'classic': 10 sources, mildly smoothed white noise (a sharp eigenvalue elbow; the tests' tiny
   * and small fixtures). 'realistic': 27 sources, Gaussian-smoothed, temporally autocorrelated noise
   * (a smoothly decaying spectrum, as in real runs; see realistic.ts). Default: classic for tiny and
   * small, realistic for S, M and L.
   */
  model?: PhantomModel;
}

export type PhantomModel = 'classic' | 'realistic';

export interface PhantomSource {
  name: string;
  kind: 'signal' | 'noise';
  noiseKind?: PhantomNoiseKind;
  /** Full 3D volume of weights (x fastest, then y, z), peak |w| = 1, zero where the source is absent. */
  map: Float32Array;
  /**
   * Length nt. Fractional signal change at a voxel of weight 1 (0.02 = 2 % of the local baseline):
   * data = baseline · (1 + Σ map·timecourse) + thermal noise.
   */
  timecourse: Float64Array;
  /**
   * What the source looks like, for use as a label (realistic model only): 'network', 'rim', 'drift',
   * 'step', 'spike', 'slice', 'pulsation', 'vascular', 'susceptibility'.
   */
  pattern?: string;
}

export interface PhantomTruth {
  sources: PhantomSource[];
  /** 3D, 1 inside the brain (grey, white, CSF), else 0. */
  brainMask: Uint8Array;
  /** 3D, 0 outside the brain, 1 grey, 2 white, 3 CSF. */
  tissue: Uint8Array;
}

export interface Phantom {
  dims: [number, number, number, number];
  /** mm */
  voxelSize: [number, number, number];
  trSeconds: number;
  /** 4×4 row-major voxel→mm, origin at the head centre. */
  affine: number[][];
  /** nx·ny·nz·nt values, x fastest, then y, z, t (NIfTI file order); BOLD-like, positive. */
  data: Float32Array;
  truth: PhantomTruth;
  /** tx, ty, tz in mm and rx, ry, rz in radians, each length nt: the motion the rim source follows. */
  motion: { translations: Float64Array[]; rotations: Float64Array[] };
  seed: number;
  size: PhantomSize;
  model: PhantomModel;
}
