import { sumsFor, type ItemSums } from './item-sums';
import { defined, REASON_ONE_CATEGORY, undefinedStat, type StatResult } from './result';
import type { ItemSelection, RatingsTable } from './table';

/** Below this, 1 − P_e is taken as 0 (one category only): κ is then undefined. */
const EPS = 1e-12;

/**
 * Fleiss' κ (Fleiss 1971, Psychol. Bull. 76:378) for N items each rated by the same number m of
 * raters (not necessarily the same raters):
 *   p_c = Σ_i n_ic / (N m),  P_i = Σ_c n_ic (n_ic − 1) / (m (m − 1)),
 *   P̄ = mean P_i,  P̄_e = Σ_c p_c²,  κ = (P̄ − P̄_e) / (1 − P̄_e).
 * Unequal vote counts: only the items with the largest vote count m* present in the table are
 * used (usually the items every rater voted on); the others are left out and counted in
 * `omitted`. For all items with missing votes use Krippendorff's α instead.
 */
export function fleissKappaFromSums(s: ItemSums, votesPerItem: number): StatResult & { omitted: number } {
  const omitted = s.pairable - s.fleissItems;
  const n = s.fleissItems;
  if (n < 2 || votesPerItem < 2) {
    return { ...undefinedStat(`fewer than 2 items with ${votesPerItem} votes (the full count)`, n), omitted };
  }
  const total = n * votesPerItem;
  let pe = 0;
  for (let c = 0; c < s.fleissCount.length; c++) {
    const p = s.fleissCount[c] / total;
    pe += p * p;
  }
  if (1 - pe < EPS) return { ...undefinedStat(REASON_ONE_CATEGORY, n), omitted };
  const pbar = s.fleissAgreeSum / n;
  return { ...defined((pbar - pe) / (1 - pe), n), omitted };
}

export function fleissKappa(table: RatingsTable, sel?: ItemSelection): StatResult & { omitted: number; votesPerItem: number } {
  const { terms, sums } = sumsFor(table, sel);
  return { ...fleissKappaFromSums(sums, terms.fleissVotes), votesPerItem: terms.fleissVotes };
}
