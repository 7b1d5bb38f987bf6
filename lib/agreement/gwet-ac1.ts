import { sumsFor, type ItemSums } from './item-sums';
import { defined, REASON_FEW_ITEMS, undefinedStat, type StatResult } from './result';
import type { ItemSelection, RatingsTable } from './table';

/**
 * Gwet's AC1 (Gwet 2008, Br. J. Math. Stat. Psychol. 61:29), multi-rater form over the items with
 * ≥ 2 votes (n′ of them), k = number of categories in the explicit list:
 *   p_a = (1/n′) Σ_i Σ_c n_ic (n_ic − 1) / (m_i (m_i − 1)),
 *   π_c = (1/n′) Σ_i n_ic / m_i,   p_e = (1/(k − 1)) Σ_c π_c (1 − π_c),
 *   AC1 = (p_a − p_e) / (1 − p_e).
 * With two raters and complete data this is Gwet's two-rater AC1, π_c = (row_c + col_c) / 2N.
 * p_e ≤ 1/k < 1, so AC1 is defined even when one category is used by everyone (it is then 1).
 */
export function gwetAC1FromSums(s: ItemSums): StatResult {
  if (s.pairable < 2) return undefinedStat(REASON_FEW_ITEMS, s.pairable);
  const k = s.shareSum.length;
  let pe = 0;
  for (let c = 0; c < k; c++) {
    const p = s.shareSum[c] / s.pairable;
    pe += p * (1 - p);
  }
  pe /= k - 1;
  const pa = s.agreeSum / s.pairable;
  return defined((pa - pe) / (1 - pe), s.pairable);
}

export function gwetAC1(table: RatingsTable, sel?: ItemSelection): StatResult {
  return gwetAC1FromSums(sumsFor(table, sel).sums);
}
