// decomposeRun: mask → voxel × time matrix → temporal PCA (+ dimensionality) → whitening →
// spatial FastICA → oriented, ordered, z-scored components (DESIGN.md §4).
import { autoBrainMask } from './brain-mask';
import { temporalCovariance } from './covariance';
import { buildDataMatrix, meanImage, type DataMatrix, type RunImage } from './data-matrix';
import { chooseDimension, type DimMethod, type DimensionChoice } from './dimensionality';
import { DecompositionError } from './errors';
import { fastIca, type Contrast } from './fastica';
import { KernelPool, sharedFloat32 } from './worker-pool';
import type { MotionParams } from './motion';
import { orientComponents } from './orient';
import { temporalPca } from './pca';
import { estimateSmoothness, type SmoothnessEstimate } from './smoothness';
import { whiten } from './whitening';

export interface DecomposeInput {
  image: RunImage;
  /** Full-volume mask (x fastest, non-zero = in); default: automatic brain mask of the mean image. */
  mask?: Uint8Array;
  /** Motion parameters of all nt volumes, for component features (not used by the decomposition). */
  motion?: MotionParams;
}

export interface DecomposeOptions {
  components?: 'auto' | number;
  dimMethod?: DimMethod;
  seed?: number;
  /** Initial volumes to drop (default 0). */
  drop?: number;
  /** Remove a least-squares line from each voxel's time series (default false). */
  detrend?: boolean;
  /** Divide each voxel's time series by its temporal SD (default true). */
  varianceNorm?: boolean;
  contrast?: Contrast;
  tol?: number;
  maxIter?: number;
  /** Voxel subset size for the FastICA warm start (see fastica.ts); 0 = off. Default 32768. */
  warmStartVoxels?: number;
  /** Worker threads for the voxel-sized kernels (default: available cores; 1 = this thread). */
  threads?: number;
}

export type ProgressCallback = (stage: string, percent: number) => void;

export interface DecompositionResult {
  /** Number of components. */
  k: number;
  /** z-scored spatial maps, component-major Float32Array k × V (V in-mask voxels, maskIndices order). */
  maps: Float32Array;
  /** Time courses (mixing matrix), T × k row-major Float64Array: row t = volume drop + t. */
  timecourses: Float64Array;
  /** Acquisition time of each kept volume's start, seconds: (drop + t)·TR. */
  timeSeconds: Float64Array;
  /** All eigenvalues of the T × T temporal covariance, descending (preprocessed data units²). */
  eigenvalues: Float64Array;
  /** Fraction of total variance explained by each component (component order). */
  explainedVariance: Float64Array;
  /** Fraction of total variance kept by the k-dimensional PCA subspace. */
  pcaVarianceKept: number;
  dimMethod: string;
  dimension: DimensionChoice;
  smoothness: SmoothnessEstimate;
  /** FastICA iterations on all voxels. */
  iterations: number;
  /** FastICA warm-start iterations and subset size (0, 0 when V was small enough). */
  warmStartIterations: number;
  warmStartVoxels: number;
  converged: boolean;
  /** Seed of the FastICA start actually used; requestedSeed is what was asked for. */
  seed: number;
  requestedSeed: number;
  icaAttempts: number;
  contrast: Contrast;
  tol: number;
  maxIter: number;
  voxelsInMask: number;
  nonFiniteVoxels: number;
  zeroVarianceVoxels: number;
  /** In-mask voxel → full-volume linear index (x fastest). */
  maskIndices: Int32Array;
  /** Final mask as a full volume (1 = used voxel). */
  mask: Uint8Array;
  /** Temporal mean of the kept volumes, full volume (input units). */
  meanImage: Float32Array;
  dims: [number, number, number];
  timepoints: number;
  droppedVolumes: number;
  trSeconds: number;
  detrended: boolean;
  varianceNormalised: boolean;
  threads: number;
  /** Wall-clock seconds per stage and 'total'. */
  seconds: Record<string, number>;
  /** Cross-restart reproducibility per component (final order, 0..1); null when restarts are off. */
  reproducibility: Float64Array | null;
  /** Things the lead should know about this decomposition (e.g. k at the search bound). */
  warnings: Array<{ code: string; message: string }>;
}

const MIN_TIMEPOINTS = 10;

/**
 * Decomposes one run (DESIGN.md §4): mask (given, else automatic from the mean image; non-finite
 * and constant voxels dropped and counted) → drop initial volumes → time-major voxel × time matrix
 * (Float32Array T × V, float64 accumulation) demeaned per voxel, optionally detrended, variance-
 * normalised by default → T × T covariance with voxels as samples (worker threads) → eigen-
 * decomposition → number of components from the eigenvalues (default Minka's Laplace evidence with
 * N = effectiveSamples = V / Π FWHM, the smoothness-corrected sample count of smoothness.ts, since
 * neighbouring voxels are not independent and the plain N = V overshoots) → PCA whitening →
 * symmetric FastICA (seeded, retried with the next seed on non-convergence) → maps oriented to a
 * positive heavy tail, ordered by variance explained, z-scored. See DecompositionResult for layouts.
 */
export async function decomposeRun(input: DecomposeInput, options: DecomposeOptions = {}, onProgress?: ProgressCallback): Promise<DecompositionResult> {
  const t0 = performance.now();
  const seconds: Record<string, number> = {};
  let mark = t0;
  const stage = (name: string, percent: number) => {
    const now = performance.now();
    seconds[name] = (now - mark) / 1000;
    mark = now;
    onProgress?.(name, percent);
  };
  const { image } = input;
  const drop = options.drop ?? 0;
  const detrend = options.detrend ?? false;
  const varianceNorm = options.varianceNorm ?? true;
  const components = options.components ?? 'auto';
  const dimMethod = options.dimMethod ?? 'laplace';
  const requestedSeed = options.seed ?? 1;
  const contrast = options.contrast ?? 'logcosh';
  const tol = options.tol ?? 1e-4;
  const maxIter = options.maxIter ?? 200;
  if (!Number.isInteger(drop) || drop < 0) throw new DecompositionError('bad_option', `drop must be a non-negative integer; got ${drop}.`);
  if (!Number.isInteger(requestedSeed) || requestedSeed < 0) throw new DecompositionError('bad_option', `seed must be a non-negative integer; got ${requestedSeed}.`);
  const T = image.nt - drop;
  if (T < MIN_TIMEPOINTS) {
    throw new DecompositionError('too_few_volumes', `The run has ${image.nt} volumes; after dropping ${drop} only ${T} remain, and at least ${MIN_TIMEPOINTS} are needed.`);
  }
  const tr = image.header.trSeconds;
  if (tr === null || !(tr > 0)) throw new DecompositionError('bad_input', 'The run has no positive repetition time (pixdim[4]); fix the header before decomposing.');
  const dims: [number, number, number] = [image.nx, image.ny, image.nz];
  const nVox = image.voxelsPerVolume;

  let mean: Float32Array;
  let mask: Uint8Array;
  let inMask = 0, nonFiniteVoxels = 0;
  let dm: DataMatrix;
  if (input.mask) {
    // One pass: extract the mask's voxels and accumulate the mean image together.
    if (input.mask.length !== nVox) {
      throw new DecompositionError('grid_mismatch', `The mask has ${input.mask.length} voxels but the run's volumes have ${nVox} (${dims.join(' × ')}); use a mask on the run's grid.`);
    }
    mask = input.mask;
    for (let i = 0; i < nVox; i++) if (mask[i]) inMask++;
    if (inMask === 0) throw new DecompositionError('empty_mask', 'The mask is empty; supply a mask with brain voxels or let the automatic mask run on the mean image.');
    const candidates = new Int32Array(inMask);
    for (let i = 0, j = 0; i < nVox; i++) if (mask[i]) candidates[j++] = i;
    const acc = { sum: new Float64Array(nVox), nonFinite: new Uint8Array(nVox) };
    stage('mask', 5);
    dm = buildDataMatrix(image, candidates, drop, { detrend, varianceNorm, meanAccumulator: acc });
    mean = new Float32Array(nVox);
    for (let i = 0; i < nVox; i++) {
      mean[i] = acc.nonFinite[i] ? 0 : acc.sum[i]! / T;
      if (mask[i] && acc.nonFinite[i]) nonFiniteVoxels++;
    }
    // Non-finite voxels were dropped with the constant ones; count them apart.
    dm = { ...dm, zeroVarianceVoxels: dm.zeroVarianceVoxels - nonFiniteVoxels };
  } else {
    const m = meanImage(image, drop);
    mean = m.mean;
    stage('mean', 5);
    mask = autoBrainMask(mean, dims);
    for (let i = 0; i < nVox; i++) {
      if (!mask[i]) continue;
      inMask++;
      if (m.nonFinite[i]) nonFiniteVoxels++;
    }
    if (inMask === 0) throw new DecompositionError('empty_mask', 'The automatic brain mask is empty; check the data or supply a mask.');
    const candidates = new Int32Array(inMask - nonFiniteVoxels);
    for (let i = 0, j = 0; i < nVox; i++) if (mask[i] && !m.nonFinite[i]) candidates[j++] = i;
    stage('mask', 10);
    dm = buildDataMatrix(image, candidates, drop, { detrend, varianceNorm });
  }
  const { x, V, maskIndices } = dm;
  if (V <= T) {
    throw new DecompositionError('empty_mask', `Only ${V} usable in-mask voxels for ${T} time points; spatial ICA needs more voxels than volumes.`);
  }
  stage('matrix', 25);

  const pool = new KernelPool(options.threads);
  try {
    const smoothness = estimateSmoothness(x, T, V, maskIndices, dims);
    stage('smoothness', 28);
    const cov = await temporalCovariance(x, T, V, pool);
    stage('covariance', 45);
    const pca = temporalPca(cov.cov, T);
    stage('pca', 50);
    const dimension = chooseDimension(pca.eigenvalues, {
      components,
      method: dimMethod,
      effectiveSamples: smoothness.effectiveSamples,
    });
    const k = dimension.k;
    stage('dimensionality', 52);
    const wh = await whiten(x, T, V, pca.vectors, pca.eigenvalues, cov.spatialMean, k, pool);
    stage('whitening', 60);
    const ica = await fastIca(wh.z, k, V, pool, { contrast, tol, maxIter, seed: requestedSeed, warmStartVoxels: options.warmStartVoxels });
    stage('ica', 90);
    const s = sharedFloat32(k * V);
    const wShared = ica.w;
    await pool.run('unmixChunk', pool.partition(V), (r) => [wh.z, k, V, wShared, r[0], r[1], s]);
    // A = dewhitening · Wᵀ (T × k): x − μ1ᵀ ≈ A·S since S = W·Z and W is orthogonal.
    const a = new Float64Array(T * k);
    for (let t = 0; t < T; t++) {
      for (let i = 0; i < k; i++) {
        let acc = 0;
        for (let j = 0; j < k; j++) acc += wh.dewhitening[t * k + j]! * ica.w[i * k + j]!;
        a[t * k + i] = acc;
      }
    }
    const oriented = orientComponents(s, a, k, V, T, cov.totalSumSquares);
    let kept = 0, total = 0;
    for (let i = 0; i < T; i++) {
      total += pca.eigenvalues[i]!;
      if (i < k) kept += pca.eigenvalues[i]!;
    }
    const finalMask = new Uint8Array(nVox);
    for (let j = 0; j < V; j++) finalMask[maskIndices[j]!] = 1;
    const timeSeconds = Float64Array.from({ length: T }, (_, t) => (drop + t) * tr);
    stage('orient', 100);
    seconds.total = (performance.now() - t0) / 1000;
    return {
      k,
      maps: oriented.maps,
      timecourses: oriented.timecourses,
      timeSeconds,
      eigenvalues: pca.eigenvalues,
      explainedVariance: oriented.explainedVariance,
      pcaVarianceKept: total > 0 ? kept / total : 0,
      dimMethod: dimension.method,
      dimension,
      smoothness,
      iterations: ica.iterations,
      warmStartIterations: ica.warmStartIterations,
      warmStartVoxels: ica.warmStartVoxels,
      converged: ica.converged,
      seed: ica.seed,
      requestedSeed,
      icaAttempts: ica.attempts,
      contrast,
      tol,
      maxIter,
      voxelsInMask: V,
      nonFiniteVoxels,
      zeroVarianceVoxels: dm.zeroVarianceVoxels,
      maskIndices,
      mask: finalMask,
      meanImage: mean,
      dims,
      timepoints: T,
      droppedVolumes: drop,
      trSeconds: tr,
      detrended: detrend,
      varianceNormalised: varianceNorm,
      threads: pool.threads,
      seconds,
      reproducibility: null,
      warnings: [],
    };
  } finally {
    await pool.close();
  }
}
