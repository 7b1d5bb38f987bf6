// lib/agreement against reference values on seeded random tables (2–5 raters, 2–4 categories,
// balanced and imbalanced prevalence, complete and with ~20% missing votes).
// Fixture: tests/fixtures/agreement/random-tables.json, made by
// scripts/reference/make-agreement-fixtures.py — Cohen κ (plain, linear, quadratic) and Fleiss κ
// from statsmodels 0.13.5 (statsmodels.stats.inter_rater); Krippendorff α, percent/specific
// agreement, PABAK and AC1 from independent numpy code in that script (statsmodels 0.13.5 has no
// α, PABAK or AC1), following Krippendorff 2011, Byrt et al. 1993 and Gwet 2008.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  cohenKappa,
  fleissKappa,
  gwetAC1,
  krippendorffAlpha,
  pabak,
  pairConfusion,
  pairGwetAC1,
  pairPercentAgreement,
  percentAgreement,
  ratingsTableFromMatrix,
  specificAgreement,
  weightedKappa,
  type StatResult,
} from '@/lib/agreement';

type Pair = {
  a: number;
  b: number;
  n: number;
  table: number[][];
  kappa: number | null;
  linear: number | null;
  quadratic: number | null;
  percent?: number;
  ac1?: number;
};
type Case = {
  name: string;
  k: number;
  raters: number;
  items: number;
  codes: (number | null)[][];
  pairs: Pair[];
  fleiss: { kappa: number | null; used: number; votesPerItem: number };
  alpha: number | null;
  percent: number | null;
  pabak: number | null;
  ac1: number | null;
  specific: (number | null)[];
};
const fixture = JSON.parse(readFileSync(path.resolve(__dirname, '../fixtures/agreement/random-tables.json'), 'utf8')) as {
  header: { library: string };
  cases: Case[];
};

const TOL = 1e-9;
function same(got: StatResult, want: number | null) {
  if (want === null) {
    expect(got.value).toBeNull();
    expect(got.reason).toBeTruthy();
  } else {
    expect(got.value).not.toBeNull();
    expect(Math.abs((got.value as number) - want)).toBeLessThan(TOL);
  }
}

describe(`agreement vs reference fixtures (${fixture.header.library})`, () => {
  it('has imbalanced, missing-vote and degenerate cases', () => {
    expect(fixture.cases.length).toBeGreaterThan(40);
    expect(fixture.cases.some((c) => c.name.includes('skew') && c.name.includes('missing'))).toBe(true);
    expect(fixture.cases.some((c) => c.alpha === null)).toBe(true);
  });

  for (const c of fixture.cases) {
    describe(c.name, () => {
      const categories = Array.from({ length: c.k }, (_, i) => `c${i}`);
      const raters = Array.from({ length: c.raters }, (_, j) => `r${j}`);
      const table = ratingsTableFromMatrix({ categories, raters, rows: c.codes });

      it('Cohen κ, linear and quadratic weighted κ per pair equal statsmodels cohens_kappa', () => {
        for (const p of c.pairs) {
          expect(pairConfusion(table, p.a, p.b).matrix).toEqual(p.table);
          same(cohenKappa(table, p.a, p.b), p.kappa);
          same(weightedKappa(table, p.a, p.b, 'linear'), p.linear);
          same(weightedKappa(table, p.a, p.b, 'quadratic'), p.quadratic);
          if (p.percent !== undefined) same(pairPercentAgreement(table, p.a, p.b), p.percent);
          if (p.ac1 !== undefined) same(pairGwetAC1(table, p.a, p.b), p.ac1);
        }
      });

      it('Fleiss κ equals statsmodels fleiss_kappa on the items with the full vote count', () => {
        const f = fleissKappa(table);
        same(f, c.fleiss.kappa);
        expect(f.votesPerItem).toBe(c.fleiss.votesPerItem);
        if (f.value !== null) expect(f.n).toBe(c.fleiss.used);
      });

      it('Krippendorff α (nominal, missing values) equals the numpy coincidence-matrix reference', () => {
        same(krippendorffAlpha(table), c.alpha);
      });

      it('percent agreement, PABAK, AC1 and specific agreement equal the numpy reference', () => {
        same(percentAgreement(table), c.percent);
        same(pabak(table), c.pabak);
        same(gwetAC1(table), c.ac1);
        const spec = specificAgreement(table);
        categories.forEach((name, i) => same(spec[name], c.specific[i]));
      });
    });
  }
});
