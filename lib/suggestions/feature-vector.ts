/**
 * The model's inputs: one row of numbers per component, built from the stored component features
 * (lib/decomposition/features.ts) and the variance the component explains.
 *
 * Missing values (a feature is null where it is undefined for a component, e.g. the spatial features
 * of a map with no supra-threshold voxels, motion features without motion, reproducibility without
 * restarts) are imputed honestly and visibly:
 * - the value is replaced by the median of that feature over the training rows where it is defined
 *   (0.5 for a feature never defined in training — a constant column then, which carries no weight);
 * - a 0/1 indicator column `<feature>:missing` is added for every feature that is null in at least
 *   one training row, so the model can learn from "undefined" itself instead of from an invented value.
 * The imputation values and the indicator list are part of the exported model (featureDefinitions).
 */

/** Feature keys in model order (ComponentFeatures keys plus varianceExplained). */
export const MODEL_FEATURE_KEYS = [
  'varianceExplained',
  'highFrequencyPower',
  'edgeFraction',
  'clusterCount',
  'largestClusterVoxels',
  'largestClusterFraction',
  'mapThresholdZ',
  'kurtosis',
  'skewness',
  'peakZ',
  'spikeScore',
  'stepScore',
  'trendR2',
  'motionCorrelation',
  'fdCorrelation',
  'meanFramewiseDisplacement',
  'temporalAutocorrelation',
  'reproducibility',
] as const;

export type ModelFeatureKey = (typeof MODEL_FEATURE_KEYS)[number];

/** One component's raw inputs: a value or null (undefined for this component). */
export type RawFeatures = Partial<Record<ModelFeatureKey, number | null>>;

/** How raw features become a model row; stored with the model. */
export type FeatureDefinition = {
  keys: ModelFeatureKey[];
  /** Median over defined training values, per key (the imputed value). */
  impute: Record<string, number>;
  /** Keys that get a 0/1 `<key>:missing` column, in this order after the value columns. */
  missingIndicators: ModelFeatureKey[];
  /** How missing values are handled, in words (shown with the model). */
  imputation: string;
};

export const IMPUTATION_TEXT =
  'A feature that is undefined for a component (null) is replaced by the median of that feature over the training components where it is defined, and a 0/1 column "<feature>:missing" records that it was undefined.';

function valueOf(f: RawFeatures, key: ModelFeatureKey): number | null {
  const v = f[key];
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/** Learns the imputation (medians, indicator columns) from the training rows only. */
export function defineFeatures(rows: readonly RawFeatures[]): FeatureDefinition {
  const impute: Record<string, number> = {};
  const missingIndicators: ModelFeatureKey[] = [];
  for (const key of MODEL_FEATURE_KEYS) {
    const defined: number[] = [];
    for (const r of rows) {
      const v = valueOf(r, key);
      if (v !== null) defined.push(v);
    }
    impute[key] = defined.length ? median(defined) : 0.5;
    if (defined.length < rows.length) missingIndicators.push(key);
  }
  return { keys: [...MODEL_FEATURE_KEYS], impute, missingIndicators, imputation: IMPUTATION_TEXT };
}

/** Column names of a model row under a definition. */
export function columnNames(def: FeatureDefinition): string[] {
  return [...def.keys, ...def.missingIndicators.map((k) => `${k}:missing`)];
}

/** One model row (value columns, then indicator columns). */
export function toRow(def: FeatureDefinition, f: RawFeatures): number[] {
  const row: number[] = [];
  for (const key of def.keys) row.push(valueOf(f, key) ?? def.impute[key]!);
  for (const key of def.missingIndicators) row.push(valueOf(f, key) === null ? 1 : 0);
  return row;
}
