/**
 * The study's consensus rule turns one component's votes into a decision. Pure and framework-free.
 *
 * - unanimous: only identical labels from every expected rater decide; anything else goes to the lead.
 * - majority: a strict majority of the expected raters decides; a tie (or no majority) goes to the lead.
 * - lead: identical labels decide; any disagreement goes to the lead.
 * Until every expected rater has voted, the component is pending (no label yet).
 * "Uncertain" is a label like any other here; whether an uncertain component is kept or removed is
 * an export question (kept by default — common practice, no source).
 */
import type { ConsensusRule } from '@/lib/vocabulary/protocol';
export type { ConsensusRule };
export type VoteForConsensus = { label: string; noiseKind: string | null };
export type AutomaticDecision =
  | { method: 'unanimous' | 'majority'; label: string; noiseKind: string | null }
  | { method: 'pending'; label: null; noiseKind: null; why: 'awaiting-votes' | 'disagreement' | 'tie' };

function counts<T>(values: T[]): Map<T, number> {
  const m = new Map<T, number>();
  for (const v of values) m.set(v, (m.get(v) ?? 0) + 1);
  return m;
}

/**
 * The noise kind of a decided component: the kind most noise voters chose; a tie goes to the kind
 * listed first in the study's noise kinds; null when no noise voter gave a kind.
 */
export function consensusNoiseKind(votes: VoteForConsensus[], label: string, kindOrder: string[]): string | null {
  const kinds = votes.filter((v) => v.label === label && v.noiseKind).map((v) => v.noiseKind as string);
  if (!kinds.length) return null;
  const tally = counts(kinds);
  const best = Math.max(...tally.values());
  const tied = [...tally.keys()].filter((k) => tally.get(k) === best);
  tied.sort((a, b) => rank(kindOrder, a) - rank(kindOrder, b));
  return tied[0];
}

const rank = (order: string[], k: string) => (order.indexOf(k) === -1 ? order.length : order.indexOf(k));

export function decideByRule(
  rule: ConsensusRule,
  votes: VoteForConsensus[],
  expectedRaters: number,
  kindOrder: string[] = [],
): AutomaticDecision {
  const pending = (why: 'awaiting-votes' | 'disagreement' | 'tie') => ({ method: 'pending' as const, label: null, noiseKind: null, why });
  if (votes.length === 0 || votes.length < expectedRaters) return pending('awaiting-votes');
  const tally = counts(votes.map((v) => v.label));
  const ranked = [...tally.entries()].sort((a, b) => b[1] - a[1]);
  const [topLabel, topCount] = ranked[0];
  const decided = (method: 'unanimous' | 'majority') => ({
    method,
    label: topLabel,
    noiseKind: consensusNoiseKind(votes, topLabel, kindOrder),
  });
  if (tally.size === 1) return decided('unanimous');
  if (rule !== 'majority') return pending('disagreement');
  if (ranked.length > 1 && ranked[1][1] === topCount) return pending('tie');
  return topCount * 2 > votes.length ? decided('majority') : pending('tie');
}
