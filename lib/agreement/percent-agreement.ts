import { sumsFor, type ItemSums } from './item-sums';
import { defined, REASON_FEW_ITEMS, undefinedStat, type StatResult } from './result';
import type { ItemSelection, RatingsTable } from './table';

/**
 * Percent agreement, pairwise: the mean over items with ≥ 2 votes of the proportion of agreeing
 * rater pairs, P_i = Σ_c n_ic (n_ic − 1) / (m_i (m_i − 1)) — Fleiss 1971 (Psychol. Bull. 76:378),
 * P̄. With two raters this is the plain proportion of items on which they agree. Items count
 * equally whatever their number of votes. Defined (it is 1) even when only one category is used.
 */
export function percentAgreementFromSums(s: ItemSums): StatResult {
  if (s.pairable < 2) return undefinedStat(REASON_FEW_ITEMS, s.pairable);
  return defined(s.agreeSum / s.pairable, s.pairable);
}

export function percentAgreement(table: RatingsTable, sel?: ItemSelection): StatResult {
  return percentAgreementFromSums(sumsFor(table, sel).sums);
}

/**
 * Proportion of specific agreement for each category c, over items with ≥ 2 votes:
 *   p_s(c) = Σ_i n_ic (n_ic − 1) / Σ_i n_ic (m_i − 1)
 * (Uebersax 1982, J. Psychiatr. Res. 17:335; "of all the times a rater used c, how often did
 * another rater of the same item use c too"). With 2 raters and 2 categories it is the positive
 * and negative agreement of Cicchetti & Feinstein 1990 (J. Clin. Epidemiol. 43:551):
 * PA = 2a / (2a + b + c), NA = 2d / (2d + b + c). Null for a category nobody used.
 */
export function specificAgreementFromSums(s: ItemSums, categories: readonly string[]): Record<string, StatResult> {
  const out: Record<string, StatResult> = {};
  categories.forEach((name, c) => {
    if (s.pairable < 2) out[name] = undefinedStat(REASON_FEW_ITEMS, s.pairable);
    else if (s.specificDen[c] === 0) out[name] = undefinedStat(`no rater used "${name}" on an item with at least 2 votes`, s.pairable);
    else out[name] = defined(s.specificNum[c] / s.specificDen[c], s.pairable);
  });
  return out;
}

export function specificAgreement(table: RatingsTable, sel?: ItemSelection): Record<string, StatResult> {
  return specificAgreementFromSums(sumsFor(table, sel).sums, table.categories);
}
