// Labels, units and plain-language hints for the features on the rating desk. A hint says what a
// high value usually means; it is a prompt for the rater, never a verdict.

import type { ComponentFeatures } from './features';

export interface FeatureHint {
  label: string;
  unit?: string;
  hint: string;
  /** What "—" means for this feature: why the value can be undefined. */
  whenUndefined: string;
  format: (v: number | null) => string;
}

export const NOT_AVAILABLE = '—';

const SPATIAL_UNDEFINED =
  'No voxels stand out from the rest of this map (fewer than 10 beyond its adaptive threshold), so where its strong voxels lie is undefined. Broad, even maps such as slow drifts often look like this.';
const MOTION_UNDEFINED = 'The run has no motion table, or the series is constant.';

/** Fixed-decimals formatter; null or non-finite values show as a dash. */
function fixed(decimals: number, suffix = ''): (v: number | null) => string {
  return (v) => (v === null || !Number.isFinite(v) ? NOT_AVAILABLE : `${v.toFixed(decimals)}${suffix}`);
}

/** Percentage formatter for 0..1 fractions. */
function percent(v: number | null): string {
  return v === null || !Number.isFinite(v) ? NOT_AVAILABLE : `${(v * 100).toFixed(0)} %`;
}

/** Whole-number formatter. */
function count(v: number | null): string {
  return v === null || !Number.isFinite(v) ? NOT_AVAILABLE : Math.round(v).toLocaleString('en-US');
}

export const featureHints: Record<keyof ComponentFeatures, FeatureHint> = {
  reproducibility: {
    label: 'Reproducibility',
    hint: 'How closely this component came back when the decomposition was re-run from other starting points (1 = identical every time). A low value means the component may be a fluke of one run: rate it with care.',
    whenUndefined: 'The decomposition was run once, without restarts, so reproducibility was not measured.',
    format: fixed(2),
  },
  highFrequencyPower: {
    label: 'Power above 0.1 Hz',
    unit: '%',
    hint: 'Much power above 0.1 Hz usually points to physiological noise or a scanner artefact; neural BOLD signal sits mostly below it.',
    whenUndefined: 'The time course has no power to compare.',
    format: percent,
  },
  edgeFraction: {
    label: 'At brain edge',
    unit: '%',
    hint: 'A map whose strong voxels hug the outline of the brain is usually head motion rather than brain activity.',
    whenUndefined: SPATIAL_UNDEFINED,
    format: percent,
  },
  clusterCount: {
    label: 'Clusters',
    hint: 'Many separate clusters often means a speckled, noisy map; a network usually shows a few large clusters.',
    whenUndefined: SPATIAL_UNDEFINED,
    format: count,
  },
  largestClusterVoxels: {
    label: 'Largest cluster',
    unit: 'voxels',
    hint: 'A large coherent cluster is typical of real networks; a tiny largest cluster suggests scattered noise.',
    whenUndefined: SPATIAL_UNDEFINED,
    format: count,
  },
  largestClusterFraction: {
    label: 'Largest cluster share',
    unit: '%',
    hint: 'When one cluster holds most strong voxels the map is compact; a small share means the map is fragmented.',
    whenUndefined: SPATIAL_UNDEFINED,
    format: percent,
  },
  mapThresholdZ: {
    label: 'Map threshold',
    unit: '|z|',
    hint: "The |z| this map's voxels must pass to count as strong (the spatial features above use it). It adapts to each map: 2.5 robust SDs from the map's median.",
    whenUndefined: SPATIAL_UNDEFINED,
    format: fixed(2),
  },
  kurtosis: {
    label: 'Map kurtosis',
    hint: 'A high value means a few voxels stand out sharply from the rest, as in focal networks or single-vessel artefacts.',
    whenUndefined: 'Not computed for this component.',
    format: fixed(2),
  },
  skewness: {
    label: 'Map skewness',
    hint: 'A clearly positive value means the map has a one-sided tail of strong voxels; near zero suggests a diffuse map.',
    whenUndefined: 'Not computed for this component.',
    format: fixed(2),
  },
  peakZ: {
    label: 'Peak |z|',
    hint: 'A very high peak confined to few voxels often marks a vessel or an artefact; real networks peak more broadly.',
    whenUndefined: 'Not computed for this component.',
    format: fixed(1),
  },
  spikeScore: {
    label: 'Spike score',
    hint: 'A high score means the time course jumps abruptly at some volume, which is typical of sudden head movement or a scanner spike.',
    whenUndefined: 'Not computed for this component.',
    format: fixed(1),
  },
  stepScore: {
    label: 'Step size',
    unit: 'SD',
    hint: 'The largest jump in the level of the time course between two parts of the run, in SDs of the noise around it. A high value with a low spike score is typical of a sudden position change or a scanner adjustment.',
    whenUndefined: 'The run is too short to split (fewer than 10 kept volumes) or the time course is flat.',
    format: fixed(1),
  },
  trendR2: {
    label: 'Slow trend',
    unit: 'R²',
    hint: 'The share of the time course explained by a straight or gently curved line over the run. A high value is typical of scanner drift or slow head movement rather than brain activity.',
    whenUndefined: 'The time course is constant or has fewer than 4 volumes.',
    format: fixed(2),
  },
  motionCorrelation: {
    label: 'Motion correlation',
    hint: 'A time course that closely follows the head-motion traces is likely a motion component.',
    whenUndefined: MOTION_UNDEFINED,
    format: fixed(2),
  },
  fdCorrelation: {
    label: 'Correlation with FD',
    hint: 'A time course that rises whenever the head moves (framewise displacement) is likely driven by motion.',
    whenUndefined: MOTION_UNDEFINED,
    format: fixed(2),
  },
  meanFramewiseDisplacement: {
    label: 'Mean FD of run',
    unit: 'mm',
    hint: 'A high mean framewise displacement means the whole run moved a lot, so expect more motion components.',
    whenUndefined: MOTION_UNDEFINED,
    format: fixed(2, ' mm'),
  },
  temporalAutocorrelation: {
    label: 'Lag-1 autocorrelation',
    hint: 'A smooth, slowly varying time course scores high; a value near zero or negative suggests fast, noise-like fluctuation.',
    whenUndefined: 'Not computed for this component.',
    format: fixed(2),
  },
};
