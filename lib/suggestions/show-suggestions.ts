/**
 * What a rater may see of the suggestions on a run: nothing unless the study's lead turned
 * suggestions on, and then only for components the rater has already voted on (the query joins
 * the rater's own votes, so an unvoted component's suggestion is never read). Each carries the
 * version of the model that made it.
 */
import 'server-only';
import { requireAssignedRun } from '@/lib/runs/assigned-run';
import { suggestionSettings, suggestionsAfterVotes } from '@/lib/db/queries/suggestions';
import type { RaterSuggestionsPayload } from './types';

export async function showSuggestions({ user, runId }: { user: { id: number }; runId: number }): Promise<RaterSuggestionsPayload> {
  const run = await requireAssignedRun({ user, runId });
  const settings = await suggestionSettings({ studyId: Number(run.studyId) });
  if (!settings.enabled || settings.modelId === null) return { enabled: settings.enabled, modelVersion: settings.version, suggestions: [] };
  return {
    enabled: true,
    modelVersion: settings.version,
    suggestions: await suggestionsAfterVotes({ runId, raterId: user.id, modelId: settings.modelId }),
  };
}
