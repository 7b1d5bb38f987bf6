// L2 logistic regression against scikit-learn 1.2.1 LogisticRegression(penalty='l2', C, solver='newton-cg'):
// fixture tests/fixtures/suggestions/logistic.json, made by scripts/reference/make-suggestion-fixtures.py.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitLogistic, predictLogistic } from '@/lib/suggestions/logistic-regression';

type Fixture = {
  source: string;
  X: number[][];
  y: number[];
  fits: { C: number; intercept: number; coefficients: number[]; probabilities: number[] }[];
};
const fx = JSON.parse(readFileSync('tests/fixtures/suggestions/logistic.json', 'utf8')) as Fixture;

describe(`L2 logistic regression vs ${fx.source}`, () => {
  for (const ref of fx.fits) {
    it(`C = ${ref.C}: same intercept, coefficients and probabilities`, () => {
      const m = fitLogistic(fx.X, fx.y, 1 / ref.C);
      expect(m.intercept).toBeCloseTo(ref.intercept, 5);
      m.coefficients.forEach((c, j) => expect(c).toBeCloseTo(ref.coefficients[j]!, 5));
      predictLogistic(m, fx.X.slice(0, 5)).forEach((p, i) => expect(p).toBeCloseTo(ref.probabilities[i]!, 6));
    });
  }
  it('stronger regularisation shrinks the coefficients (C = 0.1 has the smallest norm)', () => {
    const norm = (C: number) => Math.hypot(...fitLogistic(fx.X, fx.y, 1 / C).coefficients);
    expect(norm(0.1)).toBeLessThan(norm(1));
    expect(norm(1)).toBeLessThan(norm(10));
  });
});
