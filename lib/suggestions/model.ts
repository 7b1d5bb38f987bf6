/**
 * A trained suggestion model as plain JSON (stored in suggestion_models.model, exported, written to
 * the release ZIP) and its prediction: P(noise) for a component from its features.
 *
 * Two kinds:
 * - `logistic`: L2 logistic regression (./logistic-regression.ts) on standardised columns
 *   (z = (x − mean) / sd, mean and sd of the training rows; sd 0 → the column is left centred only);
 * - `forest`: a random forest of CART trees (ml-random-forest, gini splits) voting signal (0) or
 *   noise (1); P(noise) is the fraction of trees voting noise.
 */
import { RandomForestClassifier } from 'ml-random-forest';
import { columnNames, toRow, type FeatureDefinition, type RawFeatures } from './feature-vector';
import { predictLogistic, type LogisticModel } from './logistic-regression';

export const MODEL_FORMAT = 'quorum-suggestion-model/1';

export type LogisticSpec = { kind: 'logistic'; C: number };
export type ForestSpec = { kind: 'forest'; trees: number; maxDepth: number; maxFeatures: number; seed: number };
export type ModelSpec = LogisticSpec | ForestSpec;

export type TrainedModel =
  | { spec: LogisticSpec; standardise: { mean: number[]; sd: number[] }; logistic: LogisticModel }
  | {
      spec: ForestSpec;
      forest: unknown;
      /** Gini importance per column (ml-random-forest featureImportance, at fit time: the saved trees lack sample counts). */ importance: number[];
    };

/** The exported model: what it predicts, from what, how it was chosen. */
export type SuggestionModelJson = {
  format: typeof MODEL_FORMAT;
  positive: 'noise';
  /** P(noise) ≥ threshold → suggestion "noise", else "signal". */
  threshold: number;
  features: FeatureDefinition;
  columns: string[];
  model: TrainedModel;
};

export function specName(spec: ModelSpec): string {
  return spec.kind === 'logistic'
    ? `logistic regression (L2, C = ${spec.C})`
    : `random forest (${spec.trees} trees, depth ≤ ${spec.maxDepth})`;
}

/** Column means and SDs (population) of the rows. */
export function columnMoments(X: number[][]): { mean: number[]; sd: number[] } {
  const d = X[0]?.length ?? 0;
  const mean = new Array<number>(d).fill(0);
  const sd = new Array<number>(d).fill(0);
  for (const r of X) for (let j = 0; j < d; j++) mean[j]! += r[j]! / X.length;
  for (const r of X) for (let j = 0; j < d; j++) sd[j]! += (r[j]! - mean[j]!) ** 2 / X.length;
  return { mean, sd: sd.map((v) => Math.sqrt(v)) };
}

export function standardiseRows(X: number[][], m: { mean: number[]; sd: number[] }): number[][] {
  return X.map((r) => r.map((v, j) => (v - m.mean[j]!) / (m.sd[j]! > 1e-12 ? m.sd[j]! : 1)));
}

/** P(noise) for model rows (already built with toRow). */
export function predictRows(model: TrainedModel, rows: number[][]): number[] {
  if (rows.length === 0) return [];
  if (model.spec.kind === 'logistic') {
    const m = model as Extract<TrainedModel, { spec: LogisticSpec }>;
    return predictLogistic(m.logistic, standardiseRows(rows, m.standardise));
  }
  const forest = RandomForestClassifier.load((model as Extract<TrainedModel, { spec: ForestSpec }>).forest as never);
  return forest.predictProbability(rows, 1);
}

/** P(noise) for components' raw features under an exported model. */
export function predictNoise(json: SuggestionModelJson, features: readonly RawFeatures[]): number[] {
  if (columnNames(json.features).join('\u0000') !== json.columns.join('\u0000'))
    throw new Error('The model’s columns do not match its feature definition.');
  return predictRows(
    json.model,
    features.map((f) => toRow(json.features, f)),
  );
}
