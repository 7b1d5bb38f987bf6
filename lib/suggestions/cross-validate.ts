/**
 * Subject-wise cross-validation of the candidate models and the choice among them, then the final
 * fit on every row. Pure (no database): the train job, the bench and the tests share it.
 *
 * Per split, the imputation (feature-vector.ts) and the standardisation are learnt from the training
 * part only, so nothing of the test subjects leaks into the model. The candidate with the highest
 * cross-validated accuracy is chosen (ties: the earlier candidate, logistic first — the simpler model).
 * Every reported figure (accuracy, κ, AC1, noise sensitivity and specificity, calibration) is computed
 * from the out-of-fold predictions at the operating point P(noise) ≥ 0.5.
 */
import { scoreAgainstReference, type CalibrationScore } from '@/lib/calibration/score';
import { columnNames, defineFeatures, toRow, type RawFeatures } from './feature-vector';
import { fitModel } from './fit-model';
import { MODEL_FORMAT, predictRows, specName, type ModelSpec, type SuggestionModelJson, type TrainedModel } from './model';
import { subjectFolds } from './subject-folds';

export type TrainingRow = { subject: string; features: RawFeatures; label: 'signal' | 'noise' };

export const DEFAULT_THRESHOLD = 0.5;
export const DEFAULT_FOLDS = 5;

export const DEFAULT_CANDIDATES: ModelSpec[] = [
  { kind: 'logistic', C: 0.1 },
  { kind: 'logistic', C: 1 },
  { kind: 'logistic', C: 10 },
  { kind: 'forest', trees: 60, maxDepth: 8, maxFeatures: 0.7, seed: 7 },
];

export type CalibrationBin = { from: number; to: number; n: number; meanPredicted: number | null; observedNoise: number | null };

export type CandidateResult = { name: string; spec: ModelSpec; accuracy: number };

export type ModelReport = {
  chosen: string;
  folds: number;
  subjects: number;
  n: number;
  noise: number;
  threshold: number;
  candidates: CandidateResult[];
  /** Out-of-fold agreement of the chosen model with the decisions (labels signal/noise). */
  score: CalibrationScore;
  calibration: CalibrationBin[];
  /** Most important features first (|standardised coefficient| or forest gini importance, summing to 1). */
  importance: { feature: string; weight: number }[];
};

/** Out-of-fold P(noise) for one candidate under fixed subject folds. */
export function outOfFold(
  rows: readonly TrainingRow[],
  fold: readonly number[],
  k: number,
  spec: ModelSpec,
  onFold?: (i: number) => void,
): number[] {
  const p = new Array<number>(rows.length).fill(NaN);
  for (let f = 0; f < k; f++) {
    const train = rows.filter((_, i) => fold[i] !== f);
    const testIdx = rows.map((_, i) => i).filter((i) => fold[i] === f);
    if (!testIdx.length) continue;
    const y = train.map((r) => (r.label === 'noise' ? 1 : 0));
    let pred: number[];
    if (y.every((v) => v === y[0])) {
      pred = testIdx.map(() => y[0] ?? 0); // one class only in training: it predicts that class
    } else {
      const def = defineFeatures(train.map((r) => r.features));
      const model = fitModel(
        spec,
        train.map((r) => toRow(def, r.features)),
        y,
      );
      pred = predictRows(
        model,
        testIdx.map((i) => toRow(def, rows[i]!.features)),
      );
    }
    testIdx.forEach((i, j) => (p[i] = pred[j]!));
    onFold?.(f);
  }
  return p;
}

function accuracy(rows: readonly TrainingRow[], p: readonly number[], threshold: number): number {
  let ok = 0;
  rows.forEach((r, i) => (ok += (p[i]! >= threshold ? 'noise' : 'signal') === r.label ? 1 : 0));
  return ok / rows.length;
}

/** Ten equal-width bins of predicted P(noise) with the observed fraction of noise in each. */
export function calibrationBins(p: readonly number[], y: readonly number[], bins = 10): CalibrationBin[] {
  return Array.from({ length: bins }, (_, b) => {
    const from = b / bins;
    const to = (b + 1) / bins;
    const idx = p.map((v, i) => i).filter((i) => p[i]! >= from && (b === bins - 1 ? p[i]! <= to : p[i]! < to));
    return {
      from,
      to,
      n: idx.length,
      meanPredicted: idx.length ? idx.reduce((s, i) => s + p[i]!, 0) / idx.length : null,
      observedNoise: idx.length ? idx.reduce((s, i) => s + y[i]!, 0) / idx.length : null,
    };
  });
}

function importanceOf(model: TrainedModel, columns: string[]): { feature: string; weight: number }[] {
  let raw: number[];
  if (model.spec.kind === 'logistic' && 'logistic' in model) raw = model.logistic.coefficients.map(Math.abs);
  else raw = (model as Extract<TrainedModel, { importance: number[] }>).importance; // gini importance (normalised per tree, averaged)
  const total = raw.reduce((s, v) => s + (Number.isFinite(v) ? v : 0), 0) || 1;
  return columns
    .map((feature, j) => ({ feature, weight: (Number.isFinite(raw[j]) ? raw[j]! : 0) / total }))
    .sort((a, b) => b.weight - a.weight);
}

/** Chooses, reports and fits the final model. Needs both labels among the rows and ≥ 2 subjects. */
export function trainSuggestionModel(
  rows: readonly TrainingRow[],
  opts: { folds?: number; seed?: number; candidates?: ModelSpec[]; threshold?: number; onProgress?: (fraction: number) => void } = {},
): { model: SuggestionModelJson; report: ModelReport } {
  const candidates = opts.candidates ?? DEFAULT_CANDIDATES;
  const threshold = opts.threshold ?? DEFAULT_THRESHOLD;
  const noise = rows.filter((r) => r.label === 'noise').length;
  if (noise === 0 || noise === rows.length) throw new Error('The training decisions need both signal and noise components.');
  const { fold, k } = subjectFolds(
    rows.map((r) => r.subject),
    opts.folds ?? DEFAULT_FOLDS,
    opts.seed ?? 1,
  );
  if (k < 2) throw new Error('Subject-wise cross-validation needs components of at least two subjects.');
  const steps = candidates.length * k + 1;
  let done = 0;
  const tick = () => opts.onProgress?.(++done / steps);
  const oof = candidates.map((spec) => outOfFold(rows, fold, k, spec, tick));
  const results = candidates.map((spec, c) => ({ name: specName(spec), spec, accuracy: accuracy(rows, oof[c]!, threshold) }));
  let best = 0;
  results.forEach((r, c) => (r.accuracy > results[best]!.accuracy ? (best = c) : undefined));
  const p = oof[best]!;
  const y = rows.map((r) => (r.label === 'noise' ? 1 : 0));
  const score = scoreAgainstReference(
    rows.map((r, i) => ({ rater: p[i]! >= threshold ? 'noise' : 'signal', reference: r.label })),
    ['signal', 'noise'],
  );

  const def = defineFeatures(rows.map((r) => r.features));
  const columns = columnNames(def);
  const trained = fitModel(
    candidates[best]!,
    rows.map((r) => toRow(def, r.features)),
    y,
  );
  tick();
  return {
    model: { format: MODEL_FORMAT, positive: 'noise', threshold, features: def, columns, model: trained },
    report: {
      chosen: results[best]!.name,
      folds: k,
      subjects: new Set(rows.map((r) => r.subject)).size,
      n: rows.length,
      noise,
      threshold,
      candidates: results,
      score,
      calibration: calibrationBins(p, y),
      importance: importanceOf(trained, columns),
    },
  };
}
