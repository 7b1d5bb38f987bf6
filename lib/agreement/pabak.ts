import { sumsFor, type ItemSums } from './item-sums';
import { percentAgreementFromSums } from './percent-agreement';
import { defined, type StatResult } from './result';
import type { ItemSelection, RatingsTable } from './table';

/**
 * Prevalence- and bias-adjusted κ (Byrt, Bishop & Carlin 1993, J. Clin. Epidemiol. 46:423):
 * κ with chance agreement set to that of uniform category use, 1/k. For 2 categories
 * PABAK = 2 p_o − 1; the k-category form is PABAK = (k p_o − 1) / (k − 1), with k the number of
 * categories in the explicit list (a category nobody used still counts) and p_o the pairwise
 * percent agreement (see percentAgreement).
 */
export function pabakFromAgreement(po: number, k: number, n: number): StatResult {
  return defined((k * po - 1) / (k - 1), n);
}

export function pabakFromSums(s: ItemSums, k: number): StatResult {
  const po = percentAgreementFromSums(s);
  return po.value === null ? po : pabakFromAgreement(po.value, k, po.n);
}

export function pabak(table: RatingsTable, sel?: ItemSelection): StatResult {
  return pabakFromSums(sumsFor(table, sel).sums, table.nCategories);
}
