// Noise sensitivity per noise kind (definition: sensitivity = TP / (TP + FN) within the reference's
// noise components of each kind; common practice, no source).
import { describe, expect, it } from 'vitest';
import { sensitivityByKind } from '@/lib/agreement/kind-sensitivity';

describe('sensitivityByKind', () => {
  it('counts, per reference kind, the share the rater called noise', () => {
    const out = sensitivityByKind([
      { rater: 'noise', reference: 'noise', referenceKind: 'motion' },
      { rater: 'signal', reference: 'noise', referenceKind: 'motion' },
      { rater: 'noise', reference: 'noise', referenceKind: 'motion' },
      { rater: 'uncertain', reference: 'noise', referenceKind: 'pulsation' },
      { rater: 'noise', reference: 'noise', referenceKind: null },
      { rater: 'noise', reference: 'signal', referenceKind: null },
    ]);
    expect(out.map((k) => [k.kind, k.n, k.detected])).toEqual([
      ['motion', 3, 2],
      ['pulsation', 1, 0],
      ['unspecified', 1, 1],
    ]);
    expect(out[0]!.sensitivity.value).toBeCloseTo(2 / 3, 12);
    expect(out[1]!.sensitivity.value).toBe(0);
  });
  it('lists no kind when the reference has no noise', () => {
    expect(sensitivityByKind([{ rater: 'noise', reference: 'signal', referenceKind: null }])).toEqual([]);
  });
});
