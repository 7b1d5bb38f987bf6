// Per-component outputs of a decomposition: power spectra, rater features, the JSON summary and
// TSV tables (timecourses, spectra, features).
import { brainEdge, computeComponentFeatures, type ComponentFeatures } from './features';
import type { MotionParams } from './motion';
import type { DecompositionResult } from './pipeline';
import { powerSpectrum } from './spectrum';

/** The time course of component c (0-based) as a Float64Array of length T (from the T × k matrix). */
export function componentTimecourse(r: DecompositionResult, c: number): Float64Array {
  const out = new Float64Array(r.timepoints);
  for (let t = 0; t < r.timepoints; t++) out[t] = r.timecourses[t * r.k + c]!;
  return out;
}

/** Welch power spectrum (Hz, units²/Hz) of every component's time course; see spectrum.ts. */
export function componentSpectra(r: DecompositionResult): { frequencies: Float64Array; power: Float64Array[] } {
  const power: Float64Array[] = [];
  let frequencies: Float64Array = new Float64Array(0);
  for (let c = 0; c < r.k; c++) {
    const sp = powerSpectrum(componentTimecourse(r, c), r.trSeconds);
    frequencies = sp.frequencies;
    power.push(sp.power);
  }
  return { frequencies, power };
}

/**
 * Rater features of every component (features.ts). motion: the run's table for the kept volumes
 * (dropped initial volumes already removed, see dropInitialVolumes), so it lines up with the time
 * courses.
 */
export function componentFeatures(r: DecompositionResult, motion?: MotionParams, spectra = componentSpectra(r)): ComponentFeatures[] {
  const m = motion;
  const V = r.voxelsInMask;
  const out: ComponentFeatures[] = [];
  const edge = brainEdge(r.maskIndices, r.dims, { meanImage: r.meanImage });
  for (let c = 0; c < r.k; c++) {
    out.push(
      computeComponentFeatures({
        map: r.maps.subarray(c * V, (c + 1) * V),
        maskIndices: r.maskIndices,
        dims: r.dims,
        timecourse: componentTimecourse(r, c),
        trSeconds: r.trSeconds,
        motion: m,
        spectrum: { frequencies: spectra.frequencies, power: spectra.power[c]! },
        meanImage: r.meanImage,
        edge,
        reproducibility: r.reproducibility ? r.reproducibility[c]! : null,
      }),
    );
  }
  return out;
}

/** Full-volume 4D float32 z-maps (x fastest, component slowest), 0 outside the mask. */
export function mapsVolume(r: DecompositionResult): Float32Array {
  const n = r.dims[0] * r.dims[1] * r.dims[2];
  const V = r.voxelsInMask;
  const out = new Float32Array(n * r.k);
  for (let c = 0; c < r.k; c++) {
    const so = c * V,
      vo = c * n;
    for (let j = 0; j < V; j++) out[vo + r.maskIndices[j]!] = r.maps[so + j]!;
  }
  return out;
}

/** JSON-ready summary of every parameter and figure of a decomposition. */
export function decompositionSummary(r: DecompositionResult) {
  const round = (x: number) => Number(x.toPrecision(8));
  return {
    components: r.k,
    dimMethod: r.dimMethod,
    dimensionEstimate: r.dimension.estimated,
    dimensionRange: r.dimension.range,
    /** The automatic search's upper bound, min(⌊T/3⌋, 100, rank − 1), and whether the estimate reached it. */
    dimensionBound: r.dimension.range[1],
    dimensionAtBound: r.dimension.atBound,
    /** Every automatic method's estimate on this run, and the chosen method's criterion per k = 1 … bound + 1. */
    dimensionEstimates: r.dimension.estimates,
    dimensionCurve: r.dimension.curve,
    iidSubsampling: r.iidSubsampling
      ? {
          ...r.iidSubsampling,
          lagCorrelation: r.iidSubsampling.lagCorrelation.map(round),
          entropyDeficit: r.iidSubsampling.entropyDeficit.map(round),
        }
      : null,
    effectiveSamples: round(r.dimension.effectiveSamples),
    smoothnessFwhmVoxels: r.smoothness.fwhmVoxels.map(round),
    eigenvalues: Array.from(r.eigenvalues, round),
    explainedVariance: Array.from(r.explainedVariance, round),
    pcaVarianceKept: round(r.pcaVarianceKept),
    iterations: r.iterations,
    warmStartIterations: r.warmStartIterations,
    warmStartVoxels: r.warmStartVoxels,
    converged: r.converged,
    /** Per component (component order), 0–1; null when restarts were off. */
    reproducibility: r.reproducibility ? Array.from(r.reproducibility, (v) => Number(v.toFixed(4))) : null,
    restarts: r.restarts ? { ...r.restarts, centrotypeSimilarity: r.restarts.centrotypeSimilarity.map((v) => Number(v.toFixed(4))) } : null,
    warnings: r.warnings,
    seed: r.seed,
    requestedSeed: r.requestedSeed,
    icaAttempts: r.icaAttempts,
    contrast: r.contrast,
    tol: r.tol,
    maxIter: r.maxIter,
    voxelsInMask: r.voxelsInMask,
    nonFiniteVoxels: r.nonFiniteVoxels,
    zeroVarianceVoxels: r.zeroVarianceVoxels,
    timepoints: r.timepoints,
    droppedVolumes: r.droppedVolumes,
    trSeconds: r.trSeconds,
    detrended: r.detrended,
    varianceNormalised: r.varianceNormalised,
    threads: r.threads,
    seconds: Object.fromEntries(Object.entries(r.seconds).map(([k, v]) => [k, Number(v.toFixed(3))])),
  };
}

const fmt = (x: number | null) => (x === null || !Number.isFinite(x) ? 'n/a' : Number(x.toPrecision(7)).toString());

/** TSV: header comp-1 … comp-k, one row per kept volume. */
export function timecoursesTsv(r: DecompositionResult): string {
  const lines = [Array.from({ length: r.k }, (_, c) => `comp-${c + 1}`).join('\t')];
  for (let t = 0; t < r.timepoints; t++) {
    const row: string[] = [];
    for (let c = 0; c < r.k; c++) row.push(fmt(r.timecourses[t * r.k + c]!));
    lines.push(row.join('\t'));
  }
  return lines.join('\n') + '\n';
}

/** TSV: frequency_hz then comp-1 … comp-k power density, one row per frequency bin. */
export function spectraTsv(spectra: { frequencies: Float64Array; power: Float64Array[] }): string {
  const k = spectra.power.length;
  const lines = [['frequency_hz', ...Array.from({ length: k }, (_, c) => `comp-${c + 1}`)].join('\t')];
  for (let f = 0; f < spectra.frequencies.length; f++) {
    lines.push([fmt(spectra.frequencies[f]!), ...spectra.power.map((p) => fmt(p[f]!))].join('\t'));
  }
  return lines.join('\n') + '\n';
}

/** TSV: component (1-based), explained_variance, then one column per feature. */
export function featuresTsv(r: DecompositionResult, features: ComponentFeatures[]): string {
  const keys = features.length ? (Object.keys(features[0]!) as Array<keyof ComponentFeatures>) : [];
  const lines = [['component', 'explained_variance', ...keys].join('\t')];
  features.forEach((f, c) => {
    lines.push([String(c + 1), fmt(r.explainedVariance[c]!), ...keys.map((k) => fmt(f[k] as number | null))].join('\t'));
  });
  return lines.join('\n') + '\n';
}
