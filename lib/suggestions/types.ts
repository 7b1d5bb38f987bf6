/** Shapes shared by the suggestion use cases, routes and pages (types only); stored records' shapes are in lib/vocabulary/suggestions.ts. */
import type { StoredModelRow } from '@/lib/db/queries/suggestions';
import type { RaterSuggestion, TrainingRecord } from '@/lib/vocabulary/suggestions';
import type { ModelReport } from './cross-validate';
import type { SuggestionModelJson } from './model';

/** One stored model of a study, its JSON documents typed (they are what lib/suggestions wrote). */
export type StoredModel = Omit<StoredModelRow, 'model' | 'report'> & { model: SuggestionModelJson; report: ModelReport };

export type RaterSuggestionsPayload = { enabled: boolean; modelVersion: number | null; suggestions: RaterSuggestion[] };

export type StudySuggestionsPayload = {
  enabled: boolean;
  model: { id: number; version: number; createdAt: string; report: ModelReport; training: TrainingRecord } | null;
  training: { jobId: number; status: string; stage: string | null; percent: number | null; message: string | null } | null;
};
