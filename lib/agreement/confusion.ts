import { AgreementError } from './errors';
import { defined, undefinedStat, type StatResult } from './result';
import { MISSING, raterIndex, selectedItems, type ItemSelection, type RatingsTable } from './table';

/** A k × k confusion matrix: rows = first rater (or the rater), columns = second rater (or the reference). */
export type ConfusionMatrix = {
  categories: readonly string[];
  /** matrix[row][col] = number of items; only items both sides labelled are counted. */
  matrix: number[][];
  n: number;
};

/**
 * Fills `out` (Float64Array k × k, row-major) with the cross-tabulation of two code columns over the
 * selected items, skipping items where either code is MISSING. Returns the number of items counted.
 * `rowCodes[i*rowStride + rowCol]`, `colCodes[i*colStride + colCol]`. Allocation-free.
 */
export function fillConfusion(
  rowCodes: Int16Array,
  rowStride: number,
  rowCol: number,
  colCodes: Int16Array,
  colStride: number,
  colCol: number,
  k: number,
  idx: Int32Array,
  len: number,
  out: Float64Array,
): number {
  out.fill(0);
  let n = 0;
  for (let s = 0; s < len; s++) {
    const i = idx[s];
    const x = rowCodes[i * rowStride + rowCol];
    const y = colCodes[i * colStride + colCol];
    if (x === MISSING || y === MISSING) continue;
    out[x * k + y] += 1;
    n++;
  }
  return n;
}

export function toRows(flat: Float64Array, k: number): number[][] {
  return Array.from({ length: k }, (_, a) => Array.from(flat.subarray(a * k, a * k + k)));
}

/** Confusion matrix of two raters (rows: rater a, columns: rater b) over items both labelled. */
export function pairConfusion(table: RatingsTable, a: string | number, b: string | number, sel?: ItemSelection): ConfusionMatrix {
  const ja = raterIndex(table, a);
  const jb = raterIndex(table, b);
  const idx = selectedItems(table, sel);
  const k = table.nCategories;
  const flat = new Float64Array(k * k);
  const n = fillConfusion(table.codes, table.nRaters, ja, table.codes, table.nRaters, jb, k, idx, idx.length, flat);
  return { categories: table.categories, matrix: toRows(flat, k), n };
}

/** Encodes reference labels (names or null, one per table item) as codes; unknown names throw. */
export function encodeReference(table: RatingsTable, reference: ReadonlyArray<string | null | undefined>): Int16Array {
  if (reference.length !== table.nItems) {
    throw new AgreementError('bad_input', `${reference.length} reference labels for ${table.nItems} items`);
  }
  const out = new Int16Array(table.nItems);
  reference.forEach((label, i) => {
    if (label === null || label === undefined || label === '') out[i] = MISSING;
    else {
      const c = table.categories.indexOf(label);
      if (c < 0) throw new AgreementError('unknown_category', `reference label "${label}" on item ${table.items[i]} is not a category`);
      out[i] = c;
    }
  });
  return out;
}

/** Confusion matrix of one rater (rows) against the reference labels, e.g. the decisions (columns). */
export function referenceConfusion(
  table: RatingsTable,
  rater: string | number,
  reference: ReadonlyArray<string | null | undefined>,
  sel?: ItemSelection,
): ConfusionMatrix {
  const j = raterIndex(table, rater);
  const ref = encodeReference(table, reference);
  const idx = selectedItems(table, sel);
  const k = table.nCategories;
  const flat = new Float64Array(k * k);
  const n = fillConfusion(table.codes, table.nRaters, j, ref, 1, 0, k, idx, idx.length, flat);
  return { categories: table.categories, matrix: toRows(flat, k), n };
}

export type Detection = {
  /** TP / (TP + FN): of the reference's positive items, the share the rater flagged. */
  sensitivity: StatResult;
  /** TN / (TN + FP): of the reference's negative items, the share the rater did not flag. */
  specificity: StatResult;
  tp: number;
  fp: number;
  fn: number;
  tn: number;
};

/**
 * Detection of one category (default 'noise') by a rater against a reference, from a rater ×
 * reference confusion matrix (flat, row-major). Positive = the positive category; every other
 * category — including 'uncertain' — is negative on both sides: a rater who says 'uncertain' did
 * not flag the component as noise, and an 'uncertain' decision keeps the component (DESIGN §5).
 * Sensitivity and specificity: common practice, no source.
 */
export function detectionFromFlat(flat: Float64Array, k: number, positive: number): Detection {
  let tp = 0,
    fp = 0,
    fn = 0,
    tn = 0;
  for (let x = 0; x < k; x++) {
    for (let y = 0; y < k; y++) {
      const v = flat[x * k + y];
      if (x === positive && y === positive) tp += v;
      else if (x === positive) fp += v;
      else if (y === positive) fn += v;
      else tn += v;
    }
  }
  return {
    sensitivity: tp + fn > 0 ? defined(tp / (tp + fn), tp + fn) : undefinedStat('the reference has no positive items', 0),
    specificity: tn + fp > 0 ? defined(tn / (tn + fp), tn + fp) : undefinedStat('the reference has no negative items', 0),
    tp,
    fp,
    fn,
    tn,
  };
}

/** Detection of `positive` (default 'noise') from a ConfusionMatrix (rows rater, columns reference). */
export function detection(cm: ConfusionMatrix, positive = 'noise'): Detection {
  const k = cm.categories.length;
  const p = cm.categories.indexOf(positive);
  if (p < 0) throw new AgreementError('unknown_category', `positive category "${positive}" is not one of ${cm.categories.join(', ')}`);
  const flat = new Float64Array(k * k);
  cm.matrix.forEach((row, x) => row.forEach((v, y) => (flat[x * k + y] = v)));
  return detectionFromFlat(flat, k, p);
}
