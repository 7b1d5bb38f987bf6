// Labels, units and plain-language hints for the features on the rating desk. A hint says what a
// high value usually means; it is a prompt for the rater, never a verdict.

import type { ComponentFeatures } from './features';

export interface FeatureHint {
  label: string;
  unit?: string;
  hint: string;
  format: (v: number | null) => string;
}

const NOT_AVAILABLE = '—';

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
  highFrequencyPower: {
    label: 'Power above 0.1 Hz',
    unit: '%',
    hint: 'Much power above 0.1 Hz usually points to physiological noise or a scanner artefact; neural BOLD signal sits mostly below it.',
    format: percent,
  },
  edgeFraction: {
    label: 'At brain edge',
    unit: '%',
    hint: 'A map whose strong voxels hug the outline of the brain is usually head motion rather than brain activity.',
    format: percent,
  },
  clusterCount: {
    label: 'Clusters',
    hint: 'Many separate clusters often means a speckled, noisy map; a network usually shows a few large clusters.',
    format: count,
  },
  largestClusterVoxels: {
    label: 'Largest cluster',
    unit: 'voxels',
    hint: 'A large coherent cluster is typical of real networks; a tiny largest cluster suggests scattered noise.',
    format: count,
  },
  largestClusterFraction: {
    label: 'Largest cluster share',
    unit: '%',
    hint: 'When one cluster holds most strong voxels the map is compact; a small share means the map is fragmented.',
    format: percent,
  },
  kurtosis: {
    label: 'Map kurtosis',
    hint: 'A high value means a few voxels stand out sharply from the rest, as in focal networks or single-vessel artefacts.',
    format: fixed(2),
  },
  skewness: {
    label: 'Map skewness',
    hint: 'A clearly positive value means the map has a one-sided tail of strong voxels; near zero suggests a diffuse map.',
    format: fixed(2),
  },
  peakZ: {
    label: 'Peak |z|',
    hint: 'A very high peak confined to few voxels often marks a vessel or an artefact; real networks peak more broadly.',
    format: fixed(1),
  },
  spikeScore: {
    label: 'Spike score',
    hint: 'A high score means the time course jumps abruptly at some volume, which is typical of sudden head movement or a scanner spike.',
    format: fixed(1),
  },
  motionCorrelation: {
    label: 'Motion correlation',
    hint: 'A time course that closely follows the head-motion traces is likely a motion component.',
    format: fixed(2),
  },
  fdCorrelation: {
    label: 'Correlation with FD',
    hint: 'A time course that rises whenever the head moves (framewise displacement) is likely driven by motion.',
    format: fixed(2),
  },
  meanFramewiseDisplacement: {
    label: 'Mean FD of run',
    unit: 'mm',
    hint: 'A high mean framewise displacement means the whole run moved a lot, so expect more motion components.',
    format: fixed(2, ' mm'),
  },
  temporalAutocorrelation: {
    label: 'Lag-1 autocorrelation',
    hint: 'A smooth, slowly varying time course scores high; a value near zero or negative suggests fast, noise-like fluctuation.',
    format: fixed(2),
  },
};
