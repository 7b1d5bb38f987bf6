/**
 * The study protocol's rule for components whose cross-restart reproducibility (the component
 * feature `reproducibility`, 0..1; null when the decomposition ran without restarts) is below the
 * study's threshold: flag them, put them last, or hide them from raters. Pure, shared by the desk
 * query, the submit check and the feature panel.
 */
import type { LowReproducibilityPolicy } from '@/lib/vocabulary/protocol';

export type ReproducibilityRule = { threshold: number; policy: LowReproducibilityPolicy };

/** True when the component's reproducibility was measured and is below the threshold; unmeasured is never low. */
export function isLowReproducibility(features: Record<string, number | null | undefined>, threshold: number): boolean {
  const r = features.reproducibility;
  return typeof r === 'number' && Number.isFinite(r) && r < threshold;
}

/**
 * The components in the order a rater meets them: 'flag' keeps the order (1..k); 'last' moves the
 * low ones to the end, each group still by component number; 'hide' leaves the low ones out.
 * Returns the list and how many were hidden.
 */
export function arrangeForDesk<C extends { idx: number; features: Record<string, number | null | undefined> }>(
  components: readonly C[],
  rule: ReproducibilityRule,
): { components: C[]; hidden: number } {
  const byIdx = [...components].sort((a, b) => a.idx - b.idx);
  if (rule.policy === 'flag') return { components: byIdx, hidden: 0 };
  const ok = byIdx.filter((c) => !isLowReproducibility(c.features, rule.threshold));
  const low = byIdx.filter((c) => isLowReproducibility(c.features, rule.threshold));
  return rule.policy === 'last' ? { components: [...ok, ...low], hidden: 0 } : { components: ok, hidden: low.length };
}
