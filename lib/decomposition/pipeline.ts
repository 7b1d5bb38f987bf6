// decomposeRun: mask → voxel × time matrix → temporal PCA (+ dimensionality) → whitening →
// spatial FastICA → oriented, ordered, z-scored components (DESIGN.md §4).
import { autoBrainMask } from './brain-mask';
import { temporalCovariance } from './covariance';
import { buildDataMatrix, meanImage, type DataMatrix, type RunImage } from './data-matrix';
import { chooseDimension, DEFAULT_DIM_METHOD, numericalRank, searchBound, type DimMethod, type DimensionChoice } from './dimensionality';
import { DecompositionError } from './errors';
import { fastIca, type Contrast, type FastIcaResult } from './fastica';
import { iidSubsampling, residualVolumes, subsampledSpectrum, type IidSubsampling } from './iid-subsampling';
import { clusterEstimates, matchToCentrotypes } from './reproducibility';
import { KernelPool, sharedFloat32 } from './worker-pool';
import type { MotionParams } from './motion';
import { orientComponents } from './orient';
import { temporalPca } from './pca';
import { estimateSmoothness, type SmoothnessEstimate } from './smoothness';
import { whiten, type Whitened } from './whitening';

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
  /**
   * FastICA runs with seeds seed, seed + 1, … whose estimates are clustered for the reproducibility
   * index (reproducibility.ts). Default DEFAULT_RESTARTS; 1 = a single run, no index.
   */
  restarts?: number;
  /** Restarts run on an evenly strided voxel subset of this size when V > 2 × it (0 = all voxels). Default 16384. */
  restartVoxels?: number;
}

/** Default number of FastICA restarts for the reproducibility index. */
export const DEFAULT_RESTARTS = 5;

/** Something the user should know about a finished decomposition (summary.json, runs table, desk). */
export interface DecompositionWarning {
  /** 'dimension_at_bound' | 'ica_not_converged'. */
  code: string;
  message: string;
}

export interface RestartSummary {
  /** FastICA runs clustered (R). */
  runs: number;
  /** Seeds of the runs: seed … seed + R − 1. */
  seeds: number[];
  /** Voxels each restart ran on (V, or the strided subset's size). */
  voxels: number;
  /** How many of the R runs converged (each with its one warm-started retry). */
  converged: number;
  /** Iterations of each run (both attempts together). */
  iterations: number[];
  /** Per component (final order): estimates in its cluster (R when every restart found it once). */
  clusterSizes: number[];
  /** Per component (final order): |similarity| of the final component to its cluster's centrotype. */
  centrotypeSimilarity: number[];
}

/**
 * Progress of decomposeRun: the stage just finished (or, for 'ica', under way), percent of the whole
 * (0..100) and, inside the ICA stage, a line for people such as "restart 3 of 10, iteration 41".
 */
export type ProgressCallback = (stage: string, percent: number, detail?: string) => void;

/**
 * Share of one FastICA run done, from its convergence measure: log(change)/log(tol) is 0 at the
 * start (change ≈ 1) and 1 at convergence (change = tol); clamped to 0..0.99 (the run's end is
 * reported by the caller). An estimate for a progress bar only: FastICA's iteration count is not
 * known in advance (common practice, no source).
 */
export function icaRunFraction(change: number, tol: number): number {
  if (!(change > 0)) return 0.99;
  const f = Math.log(change) / Math.log(tol);
  return Math.max(0, Math.min(0.99, Number.isFinite(f) ? f : 0));
}

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
  /** The entropy-rate-guided voxel subsample of the iid-* methods (null for a fixed number of components). */
  iidSubsampling: (Omit<IidSubsampling, 'voxels'> & { samples: number }) | null;
  /**
   * Reproducibility index per component (final order), 0–1: the quality index of the component's
   * cluster of restart estimates (reproducibility.ts). null when restarts were off (restarts = 1).
   */
  reproducibility: Float64Array | null;
  /** Restarts behind the reproducibility index; null when off. */
  restarts: RestartSummary | null;
  /** Dimension at its bound, FastICA not converged (see DecompositionWarning). */
  warnings: DecompositionWarning[];
  /** FastICA iterations on all voxels (final run, both attempts together). */
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
}

const MIN_TIMEPOINTS = 10;

/**
 * Decomposes one run (DESIGN.md §4): mask (given, else automatic from the mean image; non-finite
 * and constant voxels dropped and counted) → drop initial volumes → time-major voxel × time matrix
 * (Float32Array T × V, float64 accumulation) demeaned per voxel, optionally detrended, variance-
 * normalised by default → T × T covariance with voxels as samples (worker threads) → eigen-
 * decomposition → number of components from the eigenvalues (default iid-mdl: MDL on the covariance
 * of an entropy-rate-guided i.i.d. voxel subsample, iid-subsampling.ts, since neighbouring voxels are
 * not independent and N = V overshoots; searched up to min(⌊T/3⌋, 100), reaching it is a warning) →
 * PCA whitening → symmetric FastICA, `restarts` times with seeds seed, seed + 1, … (on a voxel
 * subset for large V), estimates clustered by |spatial correlation| and the clusters' centrotypes
 * refined by one run on all voxels (reproducibility.ts); a run that does not converge retries once
 * from its last estimate and is then kept and flagged → maps oriented to a positive heavy tail,
 * ordered by variance explained, z-scored. See DecompositionResult for layouts.
 */
export async function decomposeRun(
  input: DecomposeInput,
  options: DecomposeOptions = {},
  onProgress?: ProgressCallback,
): Promise<DecompositionResult> {
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
  const dimMethod = options.dimMethod ?? DEFAULT_DIM_METHOD;
  const restarts = options.restarts ?? DEFAULT_RESTARTS;
  const restartVoxels = options.restartVoxels ?? 16384;
  if (!Number.isInteger(restarts) || restarts < 1 || restarts > 50)
    throw new DecompositionError('bad_option', `restarts must be a whole number from 1 to 50; got ${restarts}.`);
  if (!Number.isInteger(restartVoxels) || restartVoxels < 0)
    throw new DecompositionError('bad_option', `restartVoxels must be a non-negative integer; got ${restartVoxels}.`);
  const requestedSeed = options.seed ?? 1;
  const contrast = options.contrast ?? 'logcosh';
  const tol = options.tol ?? 1e-4;
  const maxIter = options.maxIter ?? 200;
  if (!Number.isInteger(drop) || drop < 0) throw new DecompositionError('bad_option', `drop must be a non-negative integer; got ${drop}.`);
  if (!Number.isInteger(requestedSeed) || requestedSeed < 0)
    throw new DecompositionError('bad_option', `seed must be a non-negative integer; got ${requestedSeed}.`);
  const T = image.nt - drop;
  if (T < MIN_TIMEPOINTS) {
    throw new DecompositionError(
      'too_few_volumes',
      `The run has ${image.nt} volumes; after dropping ${drop} only ${T} remain, and at least ${MIN_TIMEPOINTS} are needed.`,
    );
  }
  const tr = image.header.trSeconds;
  if (tr === null || !(tr > 0))
    throw new DecompositionError('bad_input', 'The run has no positive repetition time (pixdim[4]); fix the header before decomposing.');
  const dims: [number, number, number] = [image.nx, image.ny, image.nz];
  const nVox = image.voxelsPerVolume;

  let mean: Float32Array;
  let mask: Uint8Array;
  let inMask = 0,
    nonFiniteVoxels = 0;
  let dm: DataMatrix;
  if (input.mask) {
    // One pass: extract the mask's voxels and accumulate the mean image together.
    if (input.mask.length !== nVox) {
      throw new DecompositionError(
        'grid_mismatch',
        `The mask has ${input.mask.length} voxels but the run's volumes have ${nVox} (${dims.join(' × ')}); use a mask on the run's grid.`,
      );
    }
    mask = input.mask;
    for (let i = 0; i < nVox; i++) if (mask[i]) inMask++;
    if (inMask === 0)
      throw new DecompositionError(
        'empty_mask',
        'The mask is empty; supply a mask with brain voxels or let the automatic mask run on the mean image.',
      );
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
    throw new DecompositionError(
      'empty_mask',
      `Only ${V} usable in-mask voxels for ${T} time points; spatial ICA needs more voxels than volumes.`,
    );
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
    let iid: IidSubsampling | null = null;
    let iidSpectrum: Float64Array | null = null;
    let whBound: Whitened | null = null;
    if (components === 'auto') {
      // Whiten up to the search bound once: its leading rows serve the ICA at any k ≤ bound, and the
      // residual beyond them shows the noise's own spatial dependence for the i.i.d. subsampling.
      const m = searchBound(T, numericalRank(pca.eigenvalues));
      whBound = await whiten(x, T, V, pca.vectors, pca.eigenvalues, cov.spatialMean, m, pool);
      const res = residualVolumes(x, T, V, cov.spatialMean, whBound.z, whBound.dewhitening, m, m);
      iid = iidSubsampling(res.residual, res.volumes, V, maskIndices, dims, 3 * T);
      iidSpectrum = subsampledSpectrum(x, T, V, iid.voxels);
    }
    const dimension = chooseDimension(pca.eigenvalues, {
      components,
      method: dimMethod,
      effectiveSamples: smoothness.effectiveSamples,
      iid: iid && iidSpectrum ? { spectrum: iidSpectrum, samples: iid.voxels.length } : undefined,
    });
    const k = dimension.k;
    const warnings: DecompositionWarning[] = [];
    if (dimension.atBound) {
      warnings.push({
        code: 'dimension_at_bound',
        message: `The automatic number of components (${dimension.method}) reached its search bound, k = ${k} = min(⌊T/3⌋, 100) for T = ${T} volumes: the run may hold more structure than the bound allows, or noise the method cannot tell from signal. Check the components' reproducibility, or set the number of components.`,
      });
    }
    stage('dimensionality', 52);
    const wh = whBound ? leadingWhitened(whBound, k, T, V) : await whiten(x, T, V, pca.vectors, pca.eigenvalues, cov.spatialMean, k, pool);
    stage('whitening', 60);
    const icaOptions = { contrast, tol, maxIter };
    // ICA takes 60 → 90 %: R restarts and the final run on all voxels (R > 1), or one run, in equal shares
    const icaRuns = restarts <= 1 ? 1 : restarts + 1;
    const icaProgress = (run: number, label: string) => {
      let best = 0;
      return (iteration: number, change: number) => {
        best = Math.max(best, icaRunFraction(change, tol));
        onProgress?.('ica', 60 + (30 * (run + best)) / icaRuns, `${label}, iteration ${iteration}`);
      };
    };
    let ica: FastIcaResult;
    let reproByRow: Float64Array | null = null;
    let restartSummary: Omit<RestartSummary, 'clusterSizes' | 'centrotypeSimilarity'> | null = null;
    let rowCluster: { sizes: Int32Array; cluster: Int32Array; similarity: Float64Array } | null = null;
    if (restarts <= 1) {
      ica = await fastIca(wh.z, k, V, pool, {
        ...icaOptions,
        seed: requestedSeed,
        warmStartVoxels: options.warmStartVoxels,
        onIteration: icaProgress(0, `${k} components`),
      });
    } else {
      // Restarts on an evenly strided voxel subset (the whitened space is shared, so their estimates
      // compare by dot products), then one run on all voxels from the clusters' centrotypes.
      const stride = restartVoxels > 0 && V > 2 * restartVoxels ? Math.floor(V / restartVoxels) : 1;
      let zr = wh.z,
        Vr = V;
      if (stride > 1) {
        Vr = Math.ceil(V / stride);
        zr = sharedFloat32(k * Vr);
        for (let i = 0; i < k; i++) for (let q = 0; q < Vr; q++) zr[i * Vr + q] = wh.z[i * V + q * stride]!;
      }
      const runs: FastIcaResult[] = [];
      for (let r = 0; r < restarts; r++) {
        runs.push(
          await fastIca(zr, k, Vr, pool, {
            ...icaOptions,
            seed: (requestedSeed + r) >>> 0,
            warmStartVoxels: stride > 1 ? 0 : options.warmStartVoxels,
            onIteration: icaProgress(r, `restart ${r + 1} of ${restarts}`),
          }),
        );
        onProgress?.('ica', 60 + (30 * (r + 1)) / icaRuns, `restart ${r + 1} of ${restarts} done`);
      }
      const clusters = clusterEstimates(
        runs.map((r) => r.w),
        k,
      );
      ica = await fastIca(wh.z, k, V, pool, {
        ...icaOptions,
        seed: requestedSeed,
        init: clusters.centrotypes,
        warmStartVoxels: 0,
        onIteration: icaProgress(restarts, 'final run on all voxels'),
      });
      const match = matchToCentrotypes(ica.w, clusters.centrotypes, k);
      reproByRow = Float64Array.from(match.cluster, (c) => clusters.index[c]!);
      rowCluster = { sizes: clusters.sizes, cluster: match.cluster, similarity: match.similarity };
      restartSummary = {
        runs: restarts,
        seeds: runs.map((r) => r.seed),
        voxels: Vr,
        converged: runs.filter((r) => r.converged).length,
        iterations: runs.map((r) => r.iterations),
      };
    }
    if (!ica.converged) {
      const note = `FastICA did not converge within ${maxIter} iterations, nor in one retry of ${maxIter} more from its best estimate (tolerance ${tol}); the components are kept but may be inaccurate. Try fewer components or a larger iteration cap.`;
      warnings.push({ code: 'ica_not_converged', message: note });
    }
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
    const reproducibility = reproByRow ? Float64Array.from(oriented.order, (i) => reproByRow![i]!) : null;
    const restartsOut: RestartSummary | null =
      restartSummary && rowCluster
        ? {
            ...restartSummary,
            clusterSizes: Array.from(oriented.order, (i) => rowCluster!.sizes[rowCluster!.cluster[i]!]!),
            centrotypeSimilarity: Array.from(oriented.order, (i) => rowCluster!.similarity[i]!),
          }
        : null;
    let kept = 0,
      total = 0;
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
      iidSubsampling: iid
        ? {
            depth: iid.depth,
            lagCorrelation: iid.lagCorrelation,
            entropyDeficit: iid.entropyDeficit,
            limitedBySamples: iid.limitedBySamples,
            samples: iid.voxels.length,
          }
        : null,
      reproducibility,
      restarts: restartsOut,
      warnings,
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
    };
  } finally {
    await pool.close();
  }
}

/** The first k components of a whitening to kz ≥ k components (rows of z and P, columns of the de-whitening). */
function leadingWhitened(w: Whitened, k: number, T: number, V: number): Whitened {
  const dw = new Float64Array(T * k);
  for (let t = 0; t < T; t++) for (let i = 0; i < k; i++) dw[t * k + i] = w.dewhitening[t * w.k + i]!;
  return { z: w.z.subarray(0, k * V), k, V, whitening: w.whitening.slice(0, k * T), dewhitening: dw };
}
