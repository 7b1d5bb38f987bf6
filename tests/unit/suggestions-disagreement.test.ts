// Reconcile's sort by the model's disagreement with the votes (our own definition, see disagreement.ts).
import { describe, expect, it } from 'vitest';
import { modelDisagreement, sortByDisagreement } from '@/lib/suggestions/disagreement';

describe('modelDisagreement', () => {
  it('is 0 for a certain model every rater agrees with and 1 when all say the opposite', () => {
    expect(modelDisagreement(1, [{ label: 'noise' }, { label: 'noise' }])).toBe(0);
    expect(modelDisagreement(0, [{ label: 'noise' }, { label: 'noise' }])).toBe(1);
    expect(modelDisagreement(0.8, [{ label: 'signal' }, { label: 'uncertain' }])).toBeCloseTo((0.8 + 0.3) / 2, 12);
  });
  it('is undefined (null) without a suggestion or without votes, never 0', () => {
    expect(modelDisagreement(null, [{ label: 'noise' }])).toBeNull();
    expect(modelDisagreement(0.5, [])).toBeNull();
  });
});

describe('sortByDisagreement', () => {
  it('puts the largest disagreement first and unscored items last in their order', () => {
    const items = [
      { id: 'a', suggestion: { pNoise: 0.9 }, votes: [{ label: 'noise' }] },
      { id: 'none1', suggestion: null, votes: [{ label: 'noise' }] },
      { id: 'b', suggestion: { pNoise: 0.1 }, votes: [{ label: 'noise' }, { label: 'signal' }] },
      { id: 'c', suggestion: { pNoise: 0.95 }, votes: [{ label: 'signal' }] },
      { id: 'none2', suggestion: null, votes: [] },
    ];
    expect(sortByDisagreement(items).map((i) => i.id)).toEqual(['c', 'b', 'a', 'none1', 'none2']);
  });
});
