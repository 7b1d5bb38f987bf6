/** Shapes the suggestion routes answer with (client-safe: types only). */
import type { ModelReport } from './cross-validate';
import type { RaterSuggestion, TrainingSource } from '@/lib/db/queries/suggestions';

export type StudySuggestionsPayload = {
  enabled: boolean;
  model: { id: number; version: number; createdAt: string; report: ModelReport; training: { studies: number[]; releases: TrainingSource[]; skipped: number } } | null;
  training: { jobId: number; status: string; stage: string | null; percent: number | null; message: string | null } | null;
};

export type RaterSuggestionsPayload = { enabled: boolean; modelVersion: number | null; suggestions: RaterSuggestion[] };
