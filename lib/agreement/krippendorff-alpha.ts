import { sumsFor, type ItemSums } from './item-sums';
import { defined, REASON_FEW_ITEMS, REASON_ONE_CATEGORY, undefinedStat, type StatResult } from './result';
import type { ItemSelection, RatingsTable } from './table';

/**
 * Krippendorff's α for nominal data with missing values (Krippendorff 2011, "Computing
 * Krippendorff's Alpha-Reliability", Annenberg School for Communication, the coincidence-matrix
 * route). Only units (items) with m_u ≥ 2 values are pairable. Coincidences
 *   o_ck = Σ_u (number of ordered c–k value pairs in u) / (m_u − 1),  n_c = Σ_k o_ck,  n = Σ_c n_c,
 * and for the nominal metric
 *   α = 1 − D_o / D_e = [(n − 1) Σ_c o_cc − Σ_c n_c (n_c − 1)] / [n (n − 1) − Σ_c n_c (n_c − 1)].
 * Undefined (null) when every pairable value is the same category (D_e = 0).
 */
export function krippendorffAlphaFromSums(s: ItemSums): StatResult {
  if (s.pairable < 2) return undefinedStat(REASON_FEW_ITEMS, s.pairable);
  let n = 0;
  let expectedSame = 0;
  for (let c = 0; c < s.valueCount.length; c++) {
    const nc = s.valueCount[c];
    n += nc;
    expectedSame += nc * (nc - 1);
  }
  const de = n * (n - 1) - expectedSame;
  if (de <= 1e-12 * n * n) return undefinedStat(REASON_ONE_CATEGORY, s.pairable);
  return defined(((n - 1) * s.occSum - expectedSame) / de, s.pairable);
}

export function krippendorffAlpha(table: RatingsTable, sel?: ItemSelection): StatResult {
  return krippendorffAlphaFromSums(sumsFor(table, sel).sums);
}
