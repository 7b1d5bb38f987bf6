import { AgreementError } from './errors';

/** Code for a missing vote in `RatingsTable.codes`. */
export const MISSING = -1;

/**
 * A ratings table: items (components) × raters, each cell a category index or MISSING.
 * `codes` is item-major (row i holds the raters' codes for item i), Int16Array of nItems × nRaters.
 * The category list is explicit, so a category nobody used still counts (it matters for PABAK,
 * AC1 and weighted κ). Raters who voted on nothing are dropped and listed in `excludedRaters`.
 */
export type RatingsTable = {
  readonly categories: readonly string[];
  readonly raters: readonly string[];
  readonly items: readonly string[];
  readonly excludedRaters: readonly string[];
  readonly nItems: number;
  readonly nRaters: number;
  readonly nCategories: number;
  readonly codes: Int16Array;
};

/** Optional item selection (indices into the table's items, repeats allowed — a bootstrap resample). */
export type ItemSelection = { items?: Int32Array | readonly number[] };

export type MatrixInput = {
  categories: readonly string[];
  raters: readonly string[];
  items?: readonly string[];
  /** rows[i][j] = label of item i by rater j: a category name, a category index, or null (missing). */
  rows: ReadonlyArray<ReadonlyArray<string | number | null | undefined>>;
};

export type Vote = { item: string; rater: string; label: string | null };

export type VotesInput = {
  categories: readonly string[];
  votes: readonly Vote[];
  /** Raters to include even when absent from votes (they are then reported as excluded). */
  raters?: readonly string[];
  /** Items to include even when nobody voted on them (in this order, before any others). */
  items?: readonly string[];
};

function checkCategories(categories: readonly string[]): Map<string, number> {
  if (categories.length < 2) {
    throw new AgreementError('too_few_categories', `need at least 2 categories, got ${categories.length}`);
  }
  const index = new Map<string, number>();
  categories.forEach((c, i) => {
    if (index.has(c)) throw new AgreementError('bad_input', `category "${c}" is listed twice`);
    index.set(c, i);
  });
  if (categories.length > 32767) throw new AgreementError('bad_input', 'too many categories');
  return index;
}

function codeOf(label: string | number | null | undefined, catIndex: Map<string, number>, k: number, where: string): number {
  if (label === null || label === undefined || label === '') return MISSING;
  if (typeof label === 'number') {
    if (!Number.isInteger(label) || label < 0 || label >= k) {
      throw new AgreementError('unknown_category', `${where}: category index ${label} is outside 0..${k - 1}`);
    }
    return label;
  }
  const c = catIndex.get(label);
  if (c === undefined) {
    throw new AgreementError('unknown_category', `${where}: label "${label}" is not one of ${[...catIndex.keys()].join(', ')}`);
  }
  return c;
}

/** Drops raters without any vote; throws when fewer than 2 raters remain. */
function finish(categories: readonly string[], raters: readonly string[], items: readonly string[], full: Int16Array): RatingsTable {
  const n = items.length;
  const r = raters.length;
  const keep: number[] = [];
  const excluded: string[] = [];
  for (let j = 0; j < r; j++) {
    let any = false;
    for (let i = 0; i < n && !any; i++) any = full[i * r + j] !== MISSING;
    if (any) keep.push(j);
    else excluded.push(raters[j]);
  }
  if (keep.length < 2) {
    throw new AgreementError(
      'too_few_raters',
      `agreement needs at least 2 raters with votes, got ${keep.length}` +
        (excluded.length ? ` (no votes from: ${excluded.join(', ')})` : ''),
    );
  }
  let codes = full;
  if (keep.length !== r) {
    codes = new Int16Array(n * keep.length);
    for (let i = 0; i < n; i++) for (let jj = 0; jj < keep.length; jj++) codes[i * keep.length + jj] = full[i * r + keep[jj]];
  }
  return {
    categories: [...categories],
    raters: keep.map((j) => raters[j]),
    items: [...items],
    excludedRaters: excluded,
    nItems: n,
    nRaters: keep.length,
    nCategories: categories.length,
    codes,
  };
}

/** Builds a table from an items × raters matrix of labels (names or indices; null = missing). */
export function ratingsTableFromMatrix(input: MatrixInput): RatingsTable {
  const catIndex = checkCategories(input.categories);
  const k = input.categories.length;
  const r = input.raters.length;
  if (new Set(input.raters).size !== r) throw new AgreementError('bad_input', 'a rater is listed twice');
  const n = input.rows.length;
  const items = input.items ?? input.rows.map((_, i) => String(i + 1));
  if (items.length !== n) throw new AgreementError('bad_input', `${items.length} item names for ${n} rows`);
  const full = new Int16Array(n * r);
  for (let i = 0; i < n; i++) {
    const row = input.rows[i];
    if (row.length !== r) throw new AgreementError('bad_input', `row ${i + 1} has ${row.length} cells for ${r} raters`);
    for (let j = 0; j < r; j++) full[i * r + j] = codeOf(row[j], catIndex, k, `item ${items[i]}, rater ${input.raters[j]}`);
  }
  return finish(input.categories, input.raters, items, full);
}

/** Builds a table from long-format votes (item, rater, label); an absent vote is missing. */
export function ratingsTableFromVotes(input: VotesInput): RatingsTable {
  const catIndex = checkCategories(input.categories);
  const k = input.categories.length;
  const raterIdx = new Map<string, number>();
  const itemIdx = new Map<string, number>();
  for (const r of input.raters ?? []) if (!raterIdx.has(r)) raterIdx.set(r, raterIdx.size);
  for (const it of input.items ?? []) if (!itemIdx.has(it)) itemIdx.set(it, itemIdx.size);
  for (const v of input.votes) {
    if (!raterIdx.has(v.rater)) raterIdx.set(v.rater, raterIdx.size);
    if (!itemIdx.has(v.item)) itemIdx.set(v.item, itemIdx.size);
  }
  const r = raterIdx.size;
  const n = itemIdx.size;
  const full = new Int16Array(n * r).fill(MISSING);
  const seen = new Uint8Array(n * r);
  for (const v of input.votes) {
    const cell = (itemIdx.get(v.item) as number) * r + (raterIdx.get(v.rater) as number);
    if (seen[cell]) throw new AgreementError('duplicate_vote', `rater ${v.rater} has more than one vote on item ${v.item}`);
    seen[cell] = 1;
    full[cell] = codeOf(v.label, catIndex, k, `item ${v.item}, rater ${v.rater}`);
  }
  return finish(input.categories, [...raterIdx.keys()], [...itemIdx.keys()], full);
}

/** Index of a rater by name; throws a typed error for an unknown or excluded rater. */
export function raterIndex(table: RatingsTable, rater: string | number): number {
  if (typeof rater === 'number') {
    if (!Number.isInteger(rater) || rater < 0 || rater >= table.nRaters) {
      throw new AgreementError('unknown_rater', `rater index ${rater} is outside 0..${table.nRaters - 1}`);
    }
    return rater;
  }
  const j = table.raters.indexOf(rater);
  if (j < 0) {
    const why = table.excludedRaters.includes(rater) ? ' (excluded: no votes)' : '';
    throw new AgreementError('unknown_rater', `rater "${rater}" is not in the table${why}`);
  }
  return j;
}

/** The selected item indices (all items when no selection is given). */
export function selectedItems(table: RatingsTable, sel?: ItemSelection): Int32Array {
  if (!sel?.items) {
    const all = new Int32Array(table.nItems);
    for (let i = 0; i < all.length; i++) all[i] = i;
    return all;
  }
  const idx = sel.items instanceof Int32Array ? sel.items : Int32Array.from(sel.items);
  for (let t = 0; t < idx.length; t++) {
    if (idx[t] < 0 || idx[t] >= table.nItems) throw new AgreementError('bad_input', `item index ${idx[t]} is outside the table`);
  }
  return idx;
}

/**
 * Per-item category counts: counts[i*k + c] = number of votes for category c on item i, and
 * votes[i] = number of votes on item i. Float64Array n × k (item-major) and Int32Array n.
 */
export function itemCounts(table: RatingsTable): { counts: Float64Array; votes: Int32Array } {
  const { nItems: n, nRaters: r, nCategories: k, codes } = table;
  const counts = new Float64Array(n * k);
  const votes = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < r; j++) {
      const c = codes[i * r + j];
      if (c !== MISSING) {
        counts[i * k + c] += 1;
        votes[i] += 1;
      }
    }
  }
  return { counts, votes };
}
