/**
 * Noise sensitivity per noise kind: of the components the reference calls noise of kind K, the
 * fraction the rater called noise (any kind). Shows a lead which kinds a rater misses. A kind with
 * no reference component is not listed; the reference's noise without a kind is "unspecified".
 */
import type { StatResult } from './result';

export type KindPair = { rater: string; reference: string; referenceKind: string | null };
export type KindSensitivity = { kind: string; n: number; detected: number; sensitivity: StatResult };

export function sensitivityByKind(pairs: readonly KindPair[]): KindSensitivity[] {
  const by = new Map<string, { n: number; detected: number }>();
  for (const p of pairs) {
    if (p.reference !== 'noise') continue;
    const kind = p.referenceKind ?? 'unspecified';
    const e = by.get(kind) ?? { n: 0, detected: 0 };
    e.n++;
    if (p.rater === 'noise') e.detected++;
    by.set(kind, e);
  }
  return [...by.entries()]
    .sort((a, b) => a[0].localeCompare(b[0]))
    .map(([kind, e]) => ({ kind, n: e.n, detected: e.detected, sensitivity: { value: e.detected / e.n, n: e.n } }));
}
