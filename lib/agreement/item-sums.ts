import { itemCounts, selectedItems, type ItemSelection, type RatingsTable } from './table';

/**
 * Per-item terms shared by the multi-rater statistics (percent agreement, Fleiss' κ,
 * Krippendorff's α, Gwet's AC1, PABAK, specific agreement). Computing them once lets a bootstrap
 * resample be a pass of additions over item indices, with no allocation.
 *
 * Layout: n items, k categories; `counts` and `share` are item-major Float64Array n × k.
 * - votes[i] = m_i, the number of votes on item i
 * - agree[i] = Σ_c n_ic (n_ic − 1) / (m_i (m_i − 1)), the proportion of agreeing rater pairs
 *   on item i (Fleiss 1971, P_i), 0 when m_i < 2
 * - occ[i] = Σ_c n_ic (n_ic − 1) / (m_i − 1), item i's contribution to the diagonal of
 *   Krippendorff's coincidence matrix (Krippendorff 2011), 0 when m_i < 2
 * - share[i*k+c] = n_ic / m_i (Gwet 2008, multi-rater π_c), 0 when m_i < 2
 */
export type ItemTerms = {
  readonly n: number;
  readonly k: number;
  readonly votes: Int32Array;
  readonly counts: Float64Array;
  readonly agree: Float64Array;
  readonly occ: Float64Array;
  readonly share: Float64Array;
  /** The vote count Fleiss' κ uses: items with exactly this many votes (the largest m_i). */
  readonly fleissVotes: number;
};

export function itemTerms(table: RatingsTable): ItemTerms {
  const { counts, votes } = itemCounts(table);
  const n = table.nItems;
  const k = table.nCategories;
  const agree = new Float64Array(n);
  const occ = new Float64Array(n);
  const share = new Float64Array(n * k);
  let fleissVotes = 0;
  for (let i = 0; i < n; i++) {
    const m = votes[i];
    if (m > fleissVotes) fleissVotes = m;
    if (m < 2) continue;
    let same = 0;
    for (let c = 0; c < k; c++) {
      const x = counts[i * k + c];
      same += x * (x - 1);
      share[i * k + c] = x / m;
    }
    agree[i] = same / (m * (m - 1));
    occ[i] = same / (m - 1);
  }
  return { n, k, votes, counts, agree, occ, share, fleissVotes };
}

/** Running sums over a selection of items; allocate once with `newItemSums(k)` and reuse. */
export type ItemSums = {
  pairable: number;
  agreeSum: number;
  occSum: number;
  fleissItems: number;
  fleissAgreeSum: number;
  /** Σ n_ic over pairable items (Krippendorff n_c; also the specific-agreement and AC1 margins). */
  readonly valueCount: Float64Array;
  /** Σ n_ic over items with exactly `fleissVotes` votes. */
  readonly fleissCount: Float64Array;
  /** Σ n_ic / m_i over pairable items. */
  readonly shareSum: Float64Array;
  /** Σ n_ic (n_ic − 1) over pairable items. */
  readonly specificNum: Float64Array;
  /** Σ n_ic (m_i − 1) over pairable items. */
  readonly specificDen: Float64Array;
};

export function newItemSums(k: number): ItemSums {
  return {
    pairable: 0,
    agreeSum: 0,
    occSum: 0,
    fleissItems: 0,
    fleissAgreeSum: 0,
    valueCount: new Float64Array(k),
    fleissCount: new Float64Array(k),
    shareSum: new Float64Array(k),
    specificNum: new Float64Array(k),
    specificDen: new Float64Array(k),
  };
}

/**
 * Fills `out` with the sums over items idx[0..len) (repeats count again). Allocation-free.
 * With `specific` false the specific-agreement sums are left at 0 (the bootstrap does not need them).
 */
export function accumulateItemSums(t: ItemTerms, idx: Int32Array, len: number, out: ItemSums, specific = true): ItemSums {
  const { k, votes, counts, agree, occ, share, fleissVotes } = t;
  out.valueCount.fill(0);
  out.fleissCount.fill(0);
  out.shareSum.fill(0);
  out.specificNum.fill(0);
  out.specificDen.fill(0);
  let pairable = 0;
  let agreeSum = 0;
  let occSum = 0;
  let fleissItems = 0;
  let fleissAgreeSum = 0;
  for (let s = 0; s < len; s++) {
    const i = idx[s];
    const m = votes[i];
    if (m < 2) continue;
    pairable++;
    agreeSum += agree[i];
    occSum += occ[i];
    const isFleiss = m === fleissVotes;
    if (isFleiss) {
      fleissItems++;
      fleissAgreeSum += agree[i];
    }
    const base = i * k;
    for (let c = 0; c < k; c++) {
      const x = counts[base + c];
      out.valueCount[c] += x;
      out.shareSum[c] += share[base + c];
      if (isFleiss) out.fleissCount[c] += x;
    }
    if (specific) {
      for (let c = 0; c < k; c++) {
        const x = counts[base + c];
        out.specificNum[c] += x * (x - 1);
        out.specificDen[c] += x * (m - 1);
      }
    }
  }
  out.pairable = pairable;
  out.agreeSum = agreeSum;
  out.occSum = occSum;
  out.fleissItems = fleissItems;
  out.fleissAgreeSum = fleissAgreeSum;
  return out;
}

/** Terms and sums for a table and an optional item selection (the convenience path). */
export function sumsFor(table: RatingsTable, sel?: ItemSelection): { terms: ItemTerms; sums: ItemSums } {
  const terms = itemTerms(table);
  const idx = selectedItems(table, sel);
  return { terms, sums: accumulateItemSums(terms, idx, idx.length, newItemSums(terms.k)) };
}

/**
 * Groups items by their count vector (n_i1 … n_ik): every per-item term depends on it alone, and a
 * study has few distinct vectors (with 3 raters and 3 categories at most 20). `patterns` holds one
 * representative per vector and `patternOf[i]` the pattern of item i, so a bootstrap resample
 * reduces to a histogram of patterns (see accumulateWeightedItemSums).
 */
export function compressItems(t: ItemTerms): { patterns: ItemTerms; patternOf: Int32Array } {
  const { n, k } = t;
  const patternOf = new Int32Array(n);
  const index = new Map<string, number>();
  const reps: number[] = [];
  for (let i = 0; i < n; i++) {
    let key = '';
    for (let c = 0; c < k; c++) key += `${t.counts[i * k + c]},`;
    let p = index.get(key);
    if (p === undefined) {
      p = reps.length;
      index.set(key, p);
      reps.push(i);
    }
    patternOf[i] = p;
  }
  const P = reps.length;
  const pick = (src: Float64Array, stride: number) => {
    const out = new Float64Array(P * stride);
    reps.forEach((i, p) => out.set(src.subarray(i * stride, i * stride + stride), p * stride));
    return out;
  };
  const patterns: ItemTerms = {
    n: P,
    k,
    votes: Int32Array.from(reps.map((i) => t.votes[i])),
    counts: pick(t.counts, k),
    agree: pick(t.agree, 1),
    occ: pick(t.occ, 1),
    share: pick(t.share, k),
    fleissVotes: t.fleissVotes,
  };
  return { patterns, patternOf };
}

/** Like accumulateItemSums, with item i counted weight[i] times (weights ≥ 0). Allocation-free. */
export function accumulateWeightedItemSums(t: ItemTerms, weight: Float64Array, out: ItemSums, specific = true): ItemSums {
  const { n, k, votes, counts, agree, occ, share, fleissVotes } = t;
  out.valueCount.fill(0);
  out.fleissCount.fill(0);
  out.shareSum.fill(0);
  out.specificNum.fill(0);
  out.specificDen.fill(0);
  let pairable = 0,
    agreeSum = 0,
    occSum = 0,
    fleissItems = 0,
    fleissAgreeSum = 0;
  for (let i = 0; i < n; i++) {
    const w = weight[i];
    const m = votes[i];
    if (w === 0 || m < 2) continue;
    pairable += w;
    agreeSum += w * agree[i];
    occSum += w * occ[i];
    const isFleiss = m === fleissVotes;
    if (isFleiss) {
      fleissItems += w;
      fleissAgreeSum += w * agree[i];
    }
    for (let c = 0; c < k; c++) {
      const x = counts[i * k + c];
      out.valueCount[c] += w * x;
      out.shareSum[c] += w * share[i * k + c];
      if (isFleiss) out.fleissCount[c] += w * x;
      if (specific) {
        out.specificNum[c] += w * x * (x - 1);
        out.specificDen[c] += w * x * (m - 1);
      }
    }
  }
  out.pairable = pairable;
  out.agreeSum = agreeSum;
  out.occSum = occSum;
  out.fleissItems = fleissItems;
  out.fleissAgreeSum = fleissAgreeSum;
  return out;
}
