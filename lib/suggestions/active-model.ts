/** The suggestion model a study uses now, its stored JSON typed as what training wrote (null when none is trained). */
import { activeSuggestionModel } from '@/lib/db/queries/suggestions';
import type { StoredModel } from './types';

export async function findActiveModel(...args: Parameters<typeof activeSuggestionModel>): Promise<StoredModel | null> {
  // model and report are the documents lib/worker/kinds/train-suggestions.ts stored (SuggestionModelJson, ModelReport)
  return (await activeSuggestionModel(...args)) as StoredModel | null;
}
