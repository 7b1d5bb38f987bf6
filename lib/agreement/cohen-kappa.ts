import { fillConfusion } from './confusion';
import { defined, REASON_FEW_ITEMS, REASON_ONE_CATEGORY, undefinedStat, type StatResult } from './result';
import { raterIndex, selectedItems, type ItemSelection, type RatingsTable } from './table';

const EPS = 1e-12;

export type KappaWeights = 'linear' | 'quadratic';

/**
 * Cohen's κ (Cohen 1960, Educ. Psychol. Meas. 20:37) from a k × k confusion matrix of counts
 * (flat Float64Array, row-major): p_o = Σ_c x_cc / N, p_e = Σ_c (row_c / N)(col_c / N),
 * κ = (p_o − p_e) / (1 − p_e). Null when fewer than 2 items, or when both raters used one and the
 * same category only (p_e = 1).
 */
export function cohenKappaFromFlat(flat: Float64Array, k: number, n: number): StatResult {
  if (n < 2) return undefinedStat(REASON_FEW_ITEMS, n);
  let po = 0;
  let pe = 0;
  for (let c = 0; c < k; c++) {
    po += flat[c * k + c];
    let row = 0;
    let col = 0;
    for (let d = 0; d < k; d++) {
      row += flat[c * k + d];
      col += flat[d * k + c];
    }
    pe += row * col;
  }
  po /= n;
  pe /= n * n;
  if (1 - pe < EPS) return undefinedStat(REASON_ONE_CATEGORY, n);
  return defined((po - pe) / (1 - pe), n);
}

/**
 * Weighted κ (Cohen 1968, Psychol. Bull. 70:213) for ordered categories (their order in the
 * category list), with agreement weights w_cd = 1 − |c − d| / (k − 1) (linear) or
 * 1 − (c − d)² / (k − 1)² (quadratic): κ_w = (p_o(w) − p_e(w)) / (1 − p_e(w)), where
 * p_o(w) = Σ w_cd x_cd / N and p_e(w) = Σ w_cd row_c col_d / N². Equal to statsmodels'
 * cohens_kappa(wt='linear' | 'quadratic'), which uses the disagreement weights 1 − w.
 */
export function weightedKappaFromFlat(flat: Float64Array, k: number, n: number, weights: KappaWeights): StatResult {
  if (n < 2) return undefinedStat(REASON_FEW_ITEMS, n);
  const rows = new Float64Array(k);
  const cols = new Float64Array(k);
  for (let c = 0; c < k; c++)
    for (let d = 0; d < k; d++) {
      rows[c] += flat[c * k + d];
      cols[d] += flat[c * k + d];
    }
  // Work with disagreement weights v = 1 − w (exact zeros on the diagonal): κ_w = 1 − Σ v x / Σ v e.
  let obs = 0;
  let exp = 0;
  for (let c = 0; c < k; c++)
    for (let d = 0; d < k; d++) {
      const dist = Math.abs(c - d) / (k - 1);
      const v = weights === 'linear' ? dist : dist * dist;
      obs += v * flat[c * k + d];
      exp += (v * rows[c] * cols[d]) / n;
    }
  if (exp < EPS * n) return undefinedStat(REASON_ONE_CATEGORY, n);
  return defined(1 - obs / exp, n);
}

function pairFlat(table: RatingsTable, a: string | number, b: string | number, sel?: ItemSelection) {
  const ja = raterIndex(table, a);
  const jb = raterIndex(table, b);
  const idx = selectedItems(table, sel);
  const k = table.nCategories;
  const flat = new Float64Array(k * k);
  const n = fillConfusion(table.codes, table.nRaters, ja, table.codes, table.nRaters, jb, k, idx, idx.length, flat);
  return { flat, k, n };
}

/** Cohen's κ of two raters over the items both labelled. */
export function cohenKappa(table: RatingsTable, a: string | number, b: string | number, sel?: ItemSelection): StatResult {
  const { flat, k, n } = pairFlat(table, a, b, sel);
  return cohenKappaFromFlat(flat, k, n);
}

/** Weighted κ of two raters over the items both labelled (categories taken as ordered). */
export function weightedKappa(
  table: RatingsTable,
  a: string | number,
  b: string | number,
  weights: KappaWeights,
  sel?: ItemSelection,
): StatResult {
  const { flat, k, n } = pairFlat(table, a, b, sel);
  return weightedKappaFromFlat(flat, k, n, weights);
}

/** Percent agreement of two raters: share of the items both labelled on which they agree. */
export function pairPercentAgreementFromFlat(flat: Float64Array, k: number, n: number): StatResult {
  if (n < 2) return undefinedStat(REASON_FEW_ITEMS, n);
  let agree = 0;
  for (let c = 0; c < k; c++) agree += flat[c * k + c];
  return defined(agree / n, n);
}

/**
 * Gwet's AC1 for two raters (Gwet 2008, Br. J. Math. Stat. Psychol. 61:29):
 * π_c = (row_c + col_c) / 2N, p_e = Σ_c π_c (1 − π_c) / (k − 1), AC1 = (p_o − p_e) / (1 − p_e).
 */
export function pairGwetAC1FromFlat(flat: Float64Array, k: number, n: number): StatResult {
  if (n < 2) return undefinedStat(REASON_FEW_ITEMS, n);
  let po = 0;
  let pe = 0;
  for (let c = 0; c < k; c++) {
    po += flat[c * k + c];
    let m = 0;
    for (let d = 0; d < k; d++) m += flat[c * k + d] + flat[d * k + c];
    const p = m / (2 * n);
    pe += p * (1 - p);
  }
  po /= n;
  pe /= k - 1;
  return defined((po - pe) / (1 - pe), n);
}

/** Gwet's AC1 of two raters over the items both labelled. */
export function pairGwetAC1(table: RatingsTable, a: string | number, b: string | number, sel?: ItemSelection): StatResult {
  const { flat, k, n } = pairFlat(table, a, b, sel);
  return pairGwetAC1FromFlat(flat, k, n);
}

/** Percent agreement of two raters over the items both labelled. */
export function pairPercentAgreement(table: RatingsTable, a: string | number, b: string | number, sel?: ItemSelection): StatResult {
  const { flat, k, n } = pairFlat(table, a, b, sel);
  return pairPercentAgreementFromFlat(flat, k, n);
}
