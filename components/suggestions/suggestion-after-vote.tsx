'use client';
import { useQuery } from '@tanstack/react-query';
import { getJson } from '@/lib/api/client';
import { labelName } from '@/lib/vocabulary/protocol';
import type { RaterSuggestionsPayload } from '@/lib/suggestions/types';

/**
 * The model's suggestion for the component on the rating desk, shown only once the rater's own vote
 * on it is saved (the server sends nothing for an unvoted component, and nothing at all while the
 * lead has suggestions off). Mounted by the desk below the verdict panel.
 */
export function SuggestionAfterVote({ runId, componentId, voteSaved }: { runId: number; componentId: number; voteSaved: boolean }) {
  const q = useQuery({
    queryKey: ['run-suggestions', runId, componentId, voteSaved],
    enabled: voteSaved,
    queryFn: async () => {
      const r = await getJson<RaterSuggestionsPayload>(`/api/runs/${runId}/suggestions`);
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
  });
  const s = q.data?.suggestions.find((x) => x.componentId === componentId);
  if (!voteSaved || !q.data?.enabled || !s) return null;
  return (
    <p className="rounded border border-line bg-ground-raised px-3 py-2 text-xs text-ink-muted" data-testid="desk-suggestion">
      After your vote — the model (v{s.modelVersion}) suggests <span className="font-medium text-ink">{labelName(s.label)}</span>, P(noise){' '}
      <span className="font-mono">{s.pNoise.toFixed(2)}</span>.
    </p>
  );
}
