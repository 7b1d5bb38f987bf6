// studyAgreement: the one-call summary for a study page must agree with the individual statistics
// (which are themselves checked against statsmodels 0.13.5 / numpy references and published examples).
import { describe, expect, it } from 'vitest';
import {
  bootstrapTableStat,
  cohenKappa,
  detection,
  fleissKappa,
  gwetAC1,
  krippendorffAlpha,
  pabak,
  percentAgreement,
  ratingsTableFromVotes,
  referenceConfusion,
  studyAgreement,
  type StudyItem,
  type Vote,
} from '@/lib/agreement';
import { createRng } from '@/lib/random';

const LABELS = ['signal', 'noise', 'uncertain'];
const RATERS = ['ana', 'ben', 'chen', 'dara'];

function makeStudy(seed: number): StudyItem[] {
  const rng = createRng(seed, 'golden-xor');
  const items: StudyItem[] = [];
  for (let run = 0; run < 6; run++) {
    const panel = RATERS.filter((_, j) => j !== run % 4); // 3 of 4 raters per run
    for (let c = 1; c <= 25; c++) {
      const truth = rng.next() < 0.7 ? 'noise' : 'signal';
      const votes: Record<string, string | null> = {};
      for (const r of panel) votes[r] = rng.next() < 0.05 ? null : rng.next() < 0.8 ? truth : LABELS[rng.int(3)];
      items.push({ id: `run${run}-c${c}`, runId: `run${run}`, votes, decision: rng.next() < 0.9 ? truth : 'uncertain' });
    }
  }
  items.push({ id: 'lonely', runId: 'run0', votes: { ana: 'noise' }, decision: 'noise' });
  items.push({ id: 'unrated', runId: 'run0', votes: {}, decision: null });
  return items;
}

const items = makeStudy(9);
const table = ratingsTableFromVotes({
  categories: LABELS,
  items: items.map((i) => i.id),
  votes: items.flatMap((it) => Object.entries(it.votes).map(([rater, label]): Vote => ({ item: it.id, rater, label: label ?? null }))),
});
const boot = { resamples: 300, seed: 17 };
const res = studyAgreement({ categories: LABELS, items, bootstrap: boot });
const TOL = 1e-9;

describe('studyAgreement', () => {
  it('overall statistics equal the individual functions on the same table', () => {
    expect(res.items).toBe(items.length);
    expect(res.overall.percentAgreement.value).toBeCloseTo(percentAgreement(table).value as number, 12);
    expect(res.overall.fleissKappa.value).toBeCloseTo(fleissKappa(table).value as number, 12);
    expect(res.overall.fleissKappa.votesPerItem).toBe(3);
    expect(res.overall.krippendorffAlpha.value).toBeCloseTo(krippendorffAlpha(table).value as number, 12);
    expect(res.overall.pabak.value).toBeCloseTo(pabak(table).value as number, 12);
    expect(res.overall.gwetAC1.value).toBeCloseTo(gwetAC1(table).value as number, 12);
    expect(res.overall.krippendorffAlpha.band).toBeTypeOf('string');
  });

  it('its fast bootstrap gives the same intervals as the generic bootstrap with the same seed', () => {
    const pairs = [
      [res.overall.krippendorffAlpha.ci, bootstrapTableStat(table, krippendorffAlpha, boot)],
      [res.overall.fleissKappa.ci, bootstrapTableStat(table, fleissKappa, boot)],
      [res.overall.gwetAC1.ci, bootstrapTableStat(table, gwetAC1, boot)],
      [res.overall.pabak.ci, bootstrapTableStat(table, pabak, boot)],
      [res.overall.percentAgreement.ci, bootstrapTableStat(table, percentAgreement, boot)],
    ] as const;
    for (const [fast, slow] of pairs) {
      expect(fast).not.toBeNull();
      expect(fast!.used).toBe(slow.used);
      expect(Math.abs((fast!.lower as number) - (slow.lower as number))).toBeLessThan(TOL);
      expect(Math.abs((fast!.upper as number) - (slow.upper as number))).toBeLessThan(TOL);
      expect(fast!.lower as number).toBeLessThanOrEqual(fast!.upper as number);
    }
  });

  it('rater pairs: Cohen κ and n over the items both rated', () => {
    expect(res.pairs).toHaveLength(6);
    for (const p of res.pairs) {
      const k = cohenKappa(table, p.raterA, p.raterB);
      expect(p.n).toBe(k.n);
      expect(Math.abs((p.cohenKappa.value as number) - (k.value as number))).toBeLessThan(TOL);
    }
  });

  it('raters vs decision: κ, noise sensitivity/specificity and noise rate', () => {
    const decisions = table.items.map((id) => items.find((i) => i.id === id)!.decision ?? null);
    for (const v of res.vsDecision) {
      const cm = referenceConfusion(table, v.rater, decisions);
      expect(v.confusion).toEqual(cm.matrix);
      const d = detection(cm, 'noise');
      expect(v.sensitivity.value).toBe(d.sensitivity.value);
      expect(v.specificity.value).toBe(d.specificity.value);
      expect(v.noiseRate.value).toBeGreaterThan(0.4);
      expect(v.noiseRate.value).toBeLessThan(0.9);
    }
  });

  it('per run: α and percent agreement from that run’s components only', () => {
    expect(res.runs.map((r) => r.runId)).toEqual(['run0', 'run1', 'run2', 'run3', 'run4', 'run5']);
    const run2 = res.runs[2];
    const sel = { items: table.items.flatMap((id, i) => (id.startsWith('run2-') ? [i] : [])) };
    expect(run2.items).toBe(25);
    expect(run2.raters).toBe(3);
    expect(run2.krippendorffAlpha.value).toBeCloseTo(krippendorffAlpha(table, sel).value as number, 12);
    expect(run2.percentAgreement.value).toBeCloseTo(percentAgreement(table, sel).value as number, 12);
    expect(res.runs[0].items).toBe(27);
  });

  it('without bootstrap the intervals are null; an unknown decision label is a typed error', () => {
    const r = studyAgreement({ categories: LABELS, items, bootstrap: false });
    expect(r.overall.gwetAC1.ci).toBeNull();
    expect(() =>
      studyAgreement({
        categories: LABELS,
        items: [...items, { id: 'x', runId: 'run0', votes: { ana: 'noise', ben: 'noise' }, decision: 'maybe' }],
      }),
    ).toThrow(/"maybe"/);
  });
});
