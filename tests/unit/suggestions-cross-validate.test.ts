// Subject-wise cross-validation of the suggestion model: no subject in both the training and the
// test part of any split; imputation of undefined features stated and learnt from training rows only.
import { describe, expect, it } from 'vitest';
import { createRng } from '@/lib/random';
import { columnNames, defineFeatures, toRow } from '@/lib/suggestions/feature-vector';
import { outOfFold, trainSuggestionModel, type TrainingRow } from '@/lib/suggestions/cross-validate';
import { predictNoise } from '@/lib/suggestions/model';
import { subjectFolds } from '@/lib/suggestions/subject-folds';

/** Invented rows: noise has high-frequency power and edge fraction, signal a low one; a few nulls. */
function rows(subjects: number, perSubject: number, seed = 3): TrainingRow[] {
  const rng = createRng(seed, 'golden-xor');
  const out: TrainingRow[] = [];
  for (let s = 0; s < subjects; s++) {
    for (let c = 0; c < perSubject; c++) {
      const noise = rng.next() < 0.5;
      out.push({
        subject: `s${s}`,
        label: noise ? 'noise' : 'signal',
        features: {
          highFrequencyPower: (noise ? 0.6 : 0.2) + 0.15 * rng.next(),
          edgeFraction: c % 7 === 0 ? null : (noise ? 0.5 : 0.15) + 0.2 * rng.next(),
          kurtosis: rng.next() * 3,
          reproducibility: null,
        },
      });
    }
  }
  return out;
}

describe('subjectFolds', () => {
  it('keeps every subject in one fold and uses every fold', () => {
    const subs = ['a', 'b', 'a', 'c', 'd', 'b', 'e', 'f', 'c', 'a'];
    const { fold, k } = subjectFolds(subs, 3, 5);
    expect(k).toBe(3);
    const seen = new Map<string, number>();
    subs.forEach((s, i) => {
      if (seen.has(s)) expect(fold[i]).toBe(seen.get(s));
      seen.set(s, fold[i]!);
    });
    expect(new Set(fold).size).toBe(3);
  });
  it('lowers k to the number of subjects', () => {
    expect(subjectFolds(['a', 'a', 'b'], 5).k).toBe(2);
  });
});

describe('outOfFold never trains on the subjects it predicts', () => {
  it('flipping the labels of every row of one fold leaves that fold’s predictions unchanged', () => {
    const data = rows(8, 20);
    const { fold, k } = subjectFolds(
      data.map((r) => r.subject),
      4,
      1,
    );
    for (const spec of [
      { kind: 'logistic', C: 1 } as const,
      { kind: 'forest', trees: 10, maxDepth: 4, maxFeatures: 0.7, seed: 3 } as const,
    ]) {
      const before = outOfFold(data, fold, k, spec);
      const flipped = data.map((r, i) =>
        fold[i] === 0 ? { ...r, label: r.label === 'noise' ? ('signal' as const) : ('noise' as const) } : r,
      );
      const after = outOfFold(flipped, fold, k, spec);
      data.forEach((_, i) => {
        if (fold[i] === 0) expect(after[i]).toBe(before[i]);
      });
      // and the flip does reach the other folds' models (the test can fail)
      expect(data.some((_, i) => fold[i] !== 0 && after[i] !== before[i])).toBe(true);
    }
  });
});

describe('feature imputation', () => {
  it('replaces null by the training median and adds a missing-indicator column', () => {
    const def = defineFeatures([{ edgeFraction: 0.1 }, { edgeFraction: 0.3 }, { edgeFraction: null }, { edgeFraction: 0.9 }]);
    expect(def.impute.edgeFraction).toBeCloseTo(0.3, 12);
    expect(def.missingIndicators).toContain('edgeFraction');
    const cols = columnNames(def);
    const row = toRow(def, { edgeFraction: null });
    expect(row[cols.indexOf('edgeFraction')]).toBeCloseTo(0.3, 12);
    expect(row[cols.indexOf('edgeFraction:missing')]).toBe(1);
    expect(toRow(def, { edgeFraction: 0.7 })[cols.indexOf('edgeFraction:missing')]).toBe(0);
  });
});

describe('trainSuggestionModel', () => {
  it('learns separable invented data, reports its figures and predicts from the exported JSON', () => {
    const data = rows(10, 24);
    const { model, report } = trainSuggestionModel(data, {
      candidates: [
        { kind: 'logistic', C: 1 },
        { kind: 'forest', trees: 15, maxDepth: 5, maxFeatures: 0.7, seed: 2 },
      ],
    });
    expect(report.subjects).toBe(10);
    expect(report.folds).toBe(5);
    expect(report.score.percentAgreement.value!).toBeGreaterThan(0.9);
    expect(report.importance[0]!.feature).toMatch(/highFrequencyPower|edgeFraction/);
    expect(report.calibration).toHaveLength(10);
    expect(report.calibration.reduce((s, b) => s + b.n, 0)).toBe(data.length);
    const json = JSON.parse(JSON.stringify(model)) as typeof model;
    const p = predictNoise(json, [
      { highFrequencyPower: 0.7, edgeFraction: 0.6, kurtosis: 1, reproducibility: null },
      { highFrequencyPower: 0.2, edgeFraction: 0.2, kurtosis: 1, reproducibility: null },
    ]);
    expect(p[0]).toBeGreaterThan(0.5);
    expect(p[1]).toBeLessThan(0.5);
  });
  it('refuses one subject or one label with a message', () => {
    expect(() => trainSuggestionModel(rows(1, 20))).toThrow(/two subjects/);
    expect(() => trainSuggestionModel(rows(3, 5).map((r) => ({ ...r, label: 'noise' as const })))).toThrow(/both signal and noise/);
  });
});

describe('feature importance', () => {
  it('the forest ranks the one informative feature first and its weights sum to 1', () => {
    const rng = createRng(9, 'golden-xor');
    const data: TrainingRow[] = Array.from({ length: 160 }, (_, i) => {
      const noise = i % 2 === 0;
      return {
        subject: `s${i % 8}`,
        label: noise ? 'noise' : 'signal',
        features: { spikeScore: (noise ? 5 : 2) + rng.next(), kurtosis: rng.next(), skewness: rng.next() },
      };
    });
    const { report } = trainSuggestionModel(data, { candidates: [{ kind: 'forest', trees: 12, maxDepth: 4, maxFeatures: 0.7, seed: 1 }] });
    expect(report.importance[0]!.feature).toBe('spikeScore');
    expect(report.importance.reduce((s, f) => s + f.weight, 0)).toBeCloseTo(1, 9);
  });
});
