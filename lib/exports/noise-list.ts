/**
 * Which components go into a run's noise list: every component decided "noise"; components decided
 * "uncertain" only when the study says uncertain_in_export = remove (by default they are kept —
 * common practice is to keep a component when in doubt, DESIGN.md §5). Indices are 1-based.
 */
export type UncertainPolicy = 'keep' | 'remove';

export function isRemoved(label: string | null, policy: UncertainPolicy): boolean {
  return label === 'noise' || (label === 'uncertain' && policy === 'remove');
}

export function noiseList(decisions: readonly { idx: number; label: string | null }[], policy: UncertainPolicy): number[] {
  return decisions
    .filter((d) => isRemoved(d.label, policy))
    .map((d) => d.idx)
    .sort((a, b) => a - b);
}

/** "1,4,7" (empty string for none), the one-line form for scripts. */
export function noiseListLine(list: readonly number[]): string {
  return list.join(',');
}

export function uncertainSentence(policy: UncertainPolicy): string {
  return policy === 'remove'
    ? 'Components decided "uncertain" ARE in the noise list: this study removes uncertain components (uncertain_in_export = remove).'
    : 'Components decided "uncertain" are NOT in the noise list: this study keeps them (uncertain_in_export = keep, the default).';
}
