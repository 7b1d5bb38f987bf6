import { labelName, noiseKindName } from '@/lib/vocabulary/protocol';
import type { DecisionConflict } from './schema';

/** What a lead is told when another lead (or a changed vote) decided the component first. */
export function conflictMessage(current: DecisionConflict['conflict']): string {
  const who = current.decidedBy ?? 'The votes';
  const what = current.label
    ? `${labelName(current.label)}${current.noiseKind ? ` (${noiseKindName(current.noiseKind)})` : ''}`
    : 'pending';
  return `${who} decided this component while you were looking at it: it is now ${what}. Your decision was not saved. Reload the list to see the current decision, and decide again if you still disagree.`;
}
