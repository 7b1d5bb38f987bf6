// lib/agreement against published worked examples and hand-computed tables.
// Each check names its source; "from memory" marks a value recalled rather than read in the paper.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  cohenKappa,
  fleissKappa,
  gwetAC1,
  krippendorffAlpha,
  landisKochBand,
  pabak,
  pairGwetAC1,
  percentAgreement,
  ratingsTableFromMatrix,
  specificAgreement,
} from '@/lib/agreement';

const published = JSON.parse(readFileSync(path.resolve(__dirname, '../fixtures/agreement/published-examples.json'), 'utf8')) as {
  cohen1960_50_items: { kappa: number };
  fleiss1971_10x14x5: { counts: number[][]; kappa: number };
  krippendorff2011_nominal: { codes: (number | null)[][]; alpha: number };
};

/** Two-rater table from a 2 × 2 (or k × k) count matrix: rows rater A, columns rater B. */
function pairTable(counts: number[][], categories: string[]) {
  const rows: number[][] = [];
  counts.forEach((row, a) =>
    row.forEach((x, b) => {
      for (let t = 0; t < x; t++) rows.push([a, b]);
    }),
  );
  return ratingsTableFromMatrix({ categories, raters: ['A', 'B'], rows });
}

describe("Cohen's κ — the widely reproduced 50-item table [[20,5],[10,15]] (Cohen 1960 style example; table and κ = 0.40 from memory)", () => {
  const t = pairTable(
    [
      [20, 5],
      [10, 15],
    ],
    ['yes', 'no'],
  );
  it('κ = 0.40 (hand: p_o = 0.70, p_e = 0.50), also statsmodels 0.13.5 cohens_kappa in published-examples.json', () => {
    expect(cohenKappa(t, 'A', 'B').value).toBeCloseTo(0.4, 12);
    expect(published.cohen1960_50_items.kappa).toBeCloseTo(0.4, 12);
  });
  it('PABAK = 2·0.70 − 1 = 0.40 (Byrt, Bishop & Carlin 1993 formula, hand-computed)', () => {
    expect(pabak(t).value).toBeCloseTo(0.4, 12);
  });
  it('AC1 = (0.70 − 0.495)/(1 − 0.495) (Gwet 2008 two-rater formula, hand-computed: π = 0.55/0.45)', () => {
    expect(pairGwetAC1(t, 'A', 'B').value).toBeCloseTo(0.205 / 0.505, 12);
    expect(gwetAC1(t).value).toBeCloseTo(0.205 / 0.505, 12);
  });
  it('positive/negative agreement 40/55 and 30/45 (Cicchetti & Feinstein 1990 formulas, hand-computed)', () => {
    const s = specificAgreement(t);
    expect(s.yes.value).toBeCloseTo(40 / 55, 12);
    expect(s.no.value).toBeCloseTo(30 / 45, 12);
  });
});

describe("Fleiss' κ — the widely reproduced 10 subjects × 14 raters × 5 categories worked example (from memory; the table is the textbook/encyclopedia example, not Fleiss 1971's own 30-patient data)", () => {
  const rows = published.fleiss1971_10x14x5.counts.map((counts) => counts.flatMap((x, c) => Array<number>(x).fill(c)));
  const t = ratingsTableFromMatrix({ categories: ['1', '2', '3', '4', '5'], raters: Array.from({ length: 14 }, (_, j) => `r${j}`), rows });
  it('κ ≈ 0.210 (from memory), statsmodels 0.13.5 fleiss_kappa gives 0.20993 on the same table', () => {
    const k = fleissKappa(t);
    expect(k.value).toBeCloseTo(0.21, 3);
    expect(Math.abs((k.value as number) - published.fleiss1971_10x14x5.kappa)).toBeLessThan(1e-9);
    expect(k.n).toBe(10);
    expect(k.omitted).toBe(0);
  });
  it('P̄ = 0.378 (from memory, the same worked example)', () => {
    expect(percentAgreement(t).value).toBeCloseTo(0.378, 3);
  });
});

describe("Krippendorff's α — Krippendorff 2011 nominal example, 4 observers × 12 units with missing values", () => {
  // The data matrix is from memory; it matches third-party reproductions of the paper's table, and
  // α = 0.743 is the paper's stated value, also from memory. Recomputed by the independent numpy
  // code in scripts/reference/make-agreement-fixtures.py: 0.743421.
  const t = ratingsTableFromMatrix({
    categories: ['1', '2', '3', '4', '5'],
    raters: ['A', 'B', 'C', 'D'],
    rows: published.krippendorff2011_nominal.codes,
  });
  it('α = 0.743 (from memory), equal to the numpy reference to 1e-9', () => {
    const a = krippendorffAlpha(t);
    expect(a.value).toBeCloseTo(0.743, 3);
    expect(Math.abs((a.value as number) - published.krippendorff2011_nominal.alpha)).toBeLessThan(1e-9);
    expect(a.n).toBe(11); // unit 12 has a single value and is not pairable
  });
});

describe('the κ paradox: imbalanced labels, high agreement, low κ (Feinstein & Cicchetti 1990; table invented, values hand-computed)', () => {
  // 100 components, 'signal' dominant: both signal 90, A signal/B noise 4, A noise/B signal 4, both noise 2.
  const t = pairTable(
    [
      [90, 4],
      [4, 2],
    ],
    ['signal', 'noise'],
  );
  it('percent agreement 0.92 but κ = 0.0328/0.1128 ≈ 0.29 ("fair")', () => {
    expect(percentAgreement(t).value).toBeCloseTo(0.92, 12);
    const k = cohenKappa(t, 'A', 'B').value as number;
    expect(k).toBeCloseTo(0.0328 / 0.1128, 12);
    expect(landisKochBand(k)).toBe('fair');
  });
  it('PABAK = 0.84 and AC1 = 0.8072/0.8872 ≈ 0.91 stay high', () => {
    expect(pabak(t).value).toBeCloseTo(0.84, 12);
    expect(gwetAC1(t).value).toBeCloseTo(0.8072 / 0.8872, 12);
    expect(landisKochBand(gwetAC1(t).value)).toBe('almost perfect');
  });
  it('the k-category PABAK counts an unused category: with 3 categories PABAK = (3·0.92 − 1)/2', () => {
    const t3 = pairTable(
      [
        [90, 4, 0],
        [4, 2, 0],
        [0, 0, 0],
      ],
      ['signal', 'noise', 'uncertain'],
    );
    expect(pabak(t3).value).toBeCloseTo((3 * 0.92 - 1) / 2, 12);
    expect(cohenKappa(t3, 'A', 'B').value).toBeCloseTo(0.0328 / 0.1128, 12); // κ ignores empty categories
  });
});
