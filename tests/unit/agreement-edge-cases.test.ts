// Degenerate inputs, typed errors, verbal bands, confusion/detection and the seeded bootstrap.
import { describe, expect, it } from 'vitest';
import {
  AgreementError,
  bootstrapTableStat,
  cohenKappa,
  detection,
  fleissKappa,
  gwetAC1,
  krippendorffAlpha,
  landisKochBand,
  pabak,
  percentAgreement,
  ratingsTableFromMatrix,
  ratingsTableFromVotes,
  referenceConfusion,
  specificAgreement,
  weightedKappa,
  type StatResult,
} from '@/lib/agreement';
import { createRng } from '@/lib/random';

const LABELS = ['signal', 'noise', 'uncertain'];

function expectNull(s: StatResult) {
  expect(s.value).toBeNull();
  expect(typeof s.reason).toBe('string');
  expect((s.reason as string).length).toBeGreaterThan(5);
}

describe('degenerate inputs never give NaN (common practice, no source: undefined → null with a reason)', () => {
  it('everyone used one category: percent 1, PABAK 1, AC1 1, κ and α null with a reason', () => {
    const t = ratingsTableFromMatrix({
      categories: LABELS,
      raters: ['a', 'b', 'c'],
      rows: Array.from({ length: 8 }, () => ['signal', 'signal', 'signal']),
    });
    expect(percentAgreement(t).value).toBe(1);
    expect(pabak(t).value).toBe(1);
    expect(gwetAC1(t).value).toBe(1);
    expectNull(cohenKappa(t, 'a', 'b'));
    expectNull(weightedKappa(t, 'a', 'b', 'quadratic'));
    expectNull(fleissKappa(t));
    expectNull(krippendorffAlpha(t));
    expectNull(specificAgreement(t).noise);
    expect(specificAgreement(t).signal.value).toBe(1);
  });

  it('a rater who voted on nothing is excluded and listed', () => {
    const t = ratingsTableFromMatrix({
      categories: LABELS,
      raters: ['a', 'ghost', 'b'],
      rows: [
        ['signal', null, 'noise'],
        ['noise', null, 'noise'],
      ],
    });
    expect(t.raters).toEqual(['a', 'b']);
    expect(t.excludedRaters).toEqual(['ghost']);
    expect(() => cohenKappa(t, 'a', 'ghost')).toThrow(/excluded/);
  });

  it('fewer than 2 raters with votes is a typed error', () => {
    const run = () =>
      ratingsTableFromVotes({
        categories: LABELS,
        votes: [
          { item: 'c1', rater: 'a', label: 'noise' },
          { item: 'c1', rater: 'b', label: null },
        ],
      });
    expect(run).toThrow(AgreementError);
    try {
      run();
    } catch (e) {
      expect((e as AgreementError).code).toBe('too_few_raters');
    }
  });

  it('fewer than 2 usable items gives null with a reason for every statistic', () => {
    const t = ratingsTableFromMatrix({
      categories: LABELS,
      raters: ['a', 'b'],
      rows: [
        ['signal', 'noise'],
        ['noise', null],
      ],
    });
    for (const s of [percentAgreement(t), pabak(t), gwetAC1(t), krippendorffAlpha(t), fleissKappa(t), cohenKappa(t, 0, 1)]) expectNull(s);
  });

  it('unknown labels, duplicate votes and bad category lists are typed errors with clear messages', () => {
    expect(() => ratingsTableFromMatrix({ categories: LABELS, raters: ['a', 'b'], rows: [['signal', 'artefact']] })).toThrow(
      /"artefact" is not one of signal, noise, uncertain/,
    );
    expect(() =>
      ratingsTableFromVotes({
        categories: LABELS,
        votes: [
          { item: '1', rater: 'a', label: 'noise' },
          { item: '1', rater: 'a', label: 'signal' },
        ],
      }),
    ).toThrow(/more than one vote/);
    expect(() => ratingsTableFromMatrix({ categories: ['noise'], raters: ['a', 'b'], rows: [] })).toThrow(/at least 2 categories/);
  });

  it('random small tables (1–6 items, heavy missingness) only ever yield finite numbers or null', () => {
    const rng = createRng(7, 'golden-xor');
    for (let rep = 0; rep < 300; rep++) {
      const n = 1 + rng.int(6);
      const rows = Array.from({ length: n }, () => [0, 1, 2].map(() => (rng.next() < 0.4 ? null : rng.int(2))));
      rows[0][0] = 0;
      rows[0][1] = 1; // at least 2 raters with a vote
      const t = ratingsTableFromMatrix({ categories: LABELS, raters: ['a', 'b', 'c'], rows });
      const all: StatResult[] = [
        percentAgreement(t),
        pabak(t),
        gwetAC1(t),
        krippendorffAlpha(t),
        fleissKappa(t),
        ...Object.values(specificAgreement(t)),
      ];
      for (let a = 0; a < t.nRaters; a++)
        for (let b = a + 1; b < t.nRaters; b++) all.push(cohenKappa(t, a, b), weightedKappa(t, a, b, 'linear'));
      for (const s of all) expect(s.value === null || Number.isFinite(s.value)).toBe(true);
    }
  });
});

describe('Landis & Koch 1977 bands, Quorum convention: upper bounds inclusive', () => {
  it.each([
    [-0.5, 'poor'],
    [-1e-9, 'poor'],
    [0, 'slight'],
    [0.2, 'slight'],
    [0.2000001, 'fair'],
    [0.4, 'fair'],
    [0.4000001, 'moderate'],
    [0.6, 'moderate'],
    [0.61, 'substantial'],
    [0.8, 'substantial'],
    [0.8000001, 'almost perfect'],
    [1, 'almost perfect'],
  ] as const)('%f → %s', (v, band) => expect(landisKochBand(v)).toBe(band));
  it('null has no band; NaN and values above 1 are refused', () => {
    expect(landisKochBand(null)).toBeNull();
    expect(() => landisKochBand(Number.NaN)).toThrow(AgreementError);
    expect(() => landisKochBand(1.5)).toThrow(/at most 1/);
  });
});

describe('rater-vs-reference confusion and noise detection (sensitivity/specificity: common practice, no source)', () => {
  // Rater votes vs decisions on 8 components. 'uncertain' is not-noise on both sides.
  const rater = ['noise', 'noise', 'signal', 'uncertain', 'noise', 'signal', 'signal', 'uncertain'];
  const decision = ['noise', 'noise', 'noise', 'noise', 'signal', 'signal', 'uncertain', 'uncertain'];
  const t = ratingsTableFromMatrix({ categories: LABELS, raters: ['r', 'other'], rows: rater.map((x) => [x, 'signal']) });
  const cm = referenceConfusion(t, 'r', decision);
  it('rows are the rater, columns the decision', () => {
    // hand-tabulated: rows/columns in the order signal, noise, uncertain
    expect(cm.matrix).toEqual([
      [1, 1, 1],
      [1, 2, 0],
      [0, 1, 1],
    ]);
    expect(cm.n).toBe(8);
  });
  it('sensitivity = 2/4, specificity = 3/4 (uncertain counts as not-noise)', () => {
    const d = detection(cm);
    expect(d).toMatchObject({ tp: 2, fn: 2, fp: 1, tn: 3 });
    expect(d.sensitivity.value).toBe(0.5);
    expect(d.specificity.value).toBe(0.75);
  });
  it('a reference without noise gives null sensitivity with a reason', () => {
    const d = detection(
      referenceConfusion(
        t,
        'r',
        decision.map(() => 'signal'),
      ),
    );
    expectNull(d.sensitivity);
  });
});

describe('seeded bootstrap percentile CIs over items', () => {
  const rng = createRng(3, 'golden-xor');
  const rows = Array.from({ length: 120 }, () => {
    const truth = rng.next() < 0.3 ? 1 : 0;
    return [0, 1, 2].map(() => (rng.next() < 0.85 ? truth : 1 - truth));
  });
  const t = ratingsTableFromMatrix({ categories: LABELS, raters: ['a', 'b', 'c'], rows });

  it('is reproducible for a seed, changes with the seed, and brackets the estimate', () => {
    const ci1 = bootstrapTableStat(t, krippendorffAlpha, { resamples: 400, seed: 11 });
    const ci2 = bootstrapTableStat(t, krippendorffAlpha, { resamples: 400, seed: 11 });
    const ci3 = bootstrapTableStat(t, krippendorffAlpha, { resamples: 400, seed: 12 });
    expect(ci1).toEqual(ci2);
    expect(ci3.lower).not.toBe(ci1.lower);
    const est = krippendorffAlpha(t).value as number;
    expect(ci1.lower as number).toBeLessThan(est);
    expect(ci1.upper as number).toBeGreaterThan(est);
    expect(ci1.used).toBe(400);
    expect((ci1.upper as number) - (ci1.lower as number)).toBeLessThan(0.4);
  });

  it('skips degenerate resamples and reports how many were used', () => {
    // 20 components, one disagreement; a resample without it has a single category → κ undefined.
    // P(item absent) = (19/20)^20 ≈ 0.358, so about 358 of 1000 are skipped (binomial sd ≈ 15).
    const rows20 = Array.from({ length: 20 }, (_, i) => (i === 0 ? ['signal', 'noise'] : ['signal', 'signal']));
    const t20 = ratingsTableFromMatrix({ categories: LABELS, raters: ['a', 'b'], rows: rows20 });
    const ci = bootstrapTableStat(t20, (tt, sel) => cohenKappa(tt, 'a', 'b', sel), { resamples: 1000, seed: 5 });
    expect(ci.used + ci.skipped).toBe(1000);
    expect(ci.skipped).toBeGreaterThan(280);
    expect(ci.skipped).toBeLessThan(440);
  });

  it('the PRNG is uniform enough: mean of 20000 draws within 0.01 of 0.5, ints cover 0..9', () => {
    const g = createRng(42, 'golden-xor');
    let s = 0;
    const seen = new Set<number>();
    for (let i = 0; i < 20000; i++) {
      s += g.next();
      seen.add(g.int(10));
    }
    expect(Math.abs(s / 20000 - 0.5)).toBeLessThan(0.01);
    expect(seen.size).toBe(10);
  });

  it('refuses a non-positive resample count', () => {
    expect(() => bootstrapTableStat(t, pabak, { resamples: 0 })).toThrow(AgreementError);
  });
});
