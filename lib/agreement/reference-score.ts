/**
 * Scores one rater against the reference labels of a calibration set: the rater's label and the
 * reference label of each component they rated, pooled over the set's runs. Framework-free (no
 * database, no Next.js) so tests and the CLI share it. Every statistic comes from lib/agreement and
 * has its StatResult shape (null with a reason when undefined for the data, never NaN).
 *
 * Layout: a k × k confusion matrix, rows = the rater, columns = the reference, categories in the
 * study's label-set order; flat row-major Float64Array for the lib/agreement *FromFlat routines.
 * Noise detection: 'noise' is positive, every other label — 'uncertain' included — is negative.
 */
import {
  cohenKappaFromFlat,
  detection,
  pairGwetAC1FromFlat,
  pairPercentAgreementFromFlat,
  type ConfusionMatrix,
  type StatResult,
} from '@/lib/agreement';

/** One component: what the rater said and what the reference says. */
export type ScoredPair = { rater: string; reference: string };

export type CalibrationScore = {
  /** Components counted (rated by the rater and with a reference label in the label set). */
  n: number;
  /** Pairs left out because a label is not in the study's label set. */
  skipped: number;
  percentAgreement: StatResult;
  cohenKappa: StatResult;
  gwetAC1: StatResult;
  /** Noise detection against the reference (null values when 'noise' is not a category). */
  noise: { sensitivity: StatResult; specificity: StatResult; tp: number; fp: number; fn: number; tn: number };
  /** Rows: the rater; columns: the reference. */
  confusion: ConfusionMatrix;
};

const noNoise = (n: number): CalibrationScore['noise'] => ({
  sensitivity: { value: null, reason: 'the label set has no "noise" category', n },
  specificity: { value: null, reason: 'the label set has no "noise" category', n },
  tp: 0,
  fp: 0,
  fn: 0,
  tn: 0,
});

/** Percent agreement, Cohen's κ, Gwet's AC1 and noise sensitivity/specificity of a rater vs the reference. */
export function scoreAgainstReference(pairs: readonly ScoredPair[], categories: readonly string[]): CalibrationScore {
  const k = categories.length;
  const flat = new Float64Array(k * k);
  let n = 0;
  let skipped = 0;
  for (const p of pairs) {
    const x = categories.indexOf(p.rater);
    const y = categories.indexOf(p.reference);
    if (x < 0 || y < 0) {
      skipped++;
      continue;
    }
    flat[x * k + y] += 1;
    n++;
  }
  const confusion: ConfusionMatrix = {
    categories,
    matrix: Array.from({ length: k }, (_, a) => Array.from(flat.subarray(a * k, a * k + k))),
    n,
  };
  return {
    n,
    skipped,
    percentAgreement: pairPercentAgreementFromFlat(flat, k, n),
    cohenKappa: cohenKappaFromFlat(flat, k, n),
    gwetAC1: k >= 2 ? pairGwetAC1FromFlat(flat, k, n) : { value: null, reason: 'fewer than 2 categories', n },
    noise: categories.includes('noise') ? detection(confusion, 'noise') : noNoise(n),
    confusion,
  };
}
