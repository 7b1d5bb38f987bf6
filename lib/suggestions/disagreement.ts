/**
 * How much the model disagrees with the raters on a component: the mean over votes of
 * |P(noise) − v|, v = 1 for a noise vote, 0 for signal, 0.5 for any other label (uncertain). 0 when
 * the model is certain and every rater agrees with it, 1 when it is certain and every rater says
 * the opposite; null without a suggestion or without votes. Our own definition (for sorting only).
 */
export function modelDisagreement(pNoise: number | null | undefined, votes: readonly { label: string }[]): number | null {
  if (pNoise == null || votes.length === 0) return null;
  let s = 0;
  for (const v of votes) s += Math.abs(pNoise - (v.label === 'noise' ? 1 : v.label === 'signal' ? 0 : 0.5));
  return s / votes.length;
}

/** Items sorted by disagreement, largest first; items without a value keep their order at the end. */
export function sortByDisagreement<T extends { suggestion: { pNoise: number } | null; votes: readonly { label: string }[] }>(
  items: readonly T[],
): T[] {
  const d = new Map(items.map((i) => [i, modelDisagreement(i.suggestion?.pNoise, i.votes)]));
  return items
    .map((item, order) => ({ item, order }))
    .sort((a, b) => {
      const x = d.get(a.item),
        y = d.get(b.item);
      if (x == null || y == null) return x == null && y == null ? a.order - b.order : x == null ? 1 : -1;
      return y - x || a.order - b.order;
    })
    .map((e) => e.item);
}
