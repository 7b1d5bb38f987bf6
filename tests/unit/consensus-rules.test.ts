import { describe, expect, it } from 'vitest';
import { consensusNoiseKind, decideByRule } from '@/lib/consensus/rules';

const v = (label: string, noiseKind: string | null = null) => ({ label, noiseKind });
const KINDS = ['motion', 'pulsation', 'vascular', 'csf'];

describe('decideByRule', () => {
  it('waits until every expected rater has voted', () => {
    expect(decideByRule('majority', [v('noise'), v('noise')], 3)).toMatchObject({ method: 'pending', why: 'awaiting-votes' });
    expect(decideByRule('majority', [], 0)).toMatchObject({ method: 'pending', why: 'awaiting-votes' });
  });

  it('identical labels are unanimous under every rule', () => {
    for (const rule of ['unanimous', 'majority', 'lead'] as const) {
      expect(decideByRule(rule, [v('signal'), v('signal'), v('signal')], 3)).toMatchObject({ method: 'unanimous', label: 'signal' });
    }
  });

  it('majority decides 2 of 3; unanimous and lead rules send it to the lead', () => {
    const votes = [v('noise', 'motion'), v('noise', 'motion'), v('signal')];
    expect(decideByRule('majority', votes, 3, KINDS)).toEqual({ method: 'majority', label: 'noise', noiseKind: 'motion' });
    expect(decideByRule('unanimous', votes, 3)).toMatchObject({ method: 'pending', why: 'disagreement' });
    expect(decideByRule('lead', votes, 3)).toMatchObject({ method: 'pending', why: 'disagreement' });
  });

  it('a tie or a plurality without majority goes to the lead under the majority rule', () => {
    expect(decideByRule('majority', [v('noise'), v('signal')], 2)).toMatchObject({ method: 'pending', why: 'tie' });
    expect(decideByRule('majority', [v('noise'), v('noise'), v('signal'), v('signal')], 4)).toMatchObject({ why: 'tie' });
    // 2 noise, 1 signal, 1 uncertain, 1 uncertain… plurality of 2 out of 5 is no majority
    const five = [v('noise'), v('noise'), v('signal'), v('uncertain'), v('other')];
    expect(decideByRule('majority', five, 5)).toMatchObject({ method: 'pending', why: 'tie' });
  });

  it('uncertain is a category of its own', () => {
    expect(decideByRule('majority', [v('uncertain'), v('uncertain'), v('noise')], 3)).toMatchObject({
      method: 'majority',
      label: 'uncertain',
    });
  });
});

describe('consensusNoiseKind', () => {
  it('takes the most chosen kind among the winning label, ties by the study order', () => {
    expect(consensusNoiseKind([v('noise', 'csf'), v('noise', 'csf'), v('noise', 'motion')], 'noise', KINDS)).toBe('csf');
    expect(consensusNoiseKind([v('noise', 'csf'), v('noise', 'motion')], 'noise', KINDS)).toBe('motion');
    expect(consensusNoiseKind([v('noise'), v('signal', 'motion')], 'noise', KINDS)).toBeNull();
  });
});
