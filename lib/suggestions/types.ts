/** Shapes shared by the suggestion queries, routes and pages (types only). */
import type { ModelReport } from './cross-validate';
import type { RawFeatures } from './feature-vector';
import type { SuggestionModelJson } from './model';

export type { RawFeatures, ModelReport, SuggestionModelJson };

/** A release whose decisions trained a model. */
export type TrainingSource = { releaseId: number; studyId: number; runId: number | null; version: number };

/** What a model was trained on (stored with it). */
export type TrainingRecord = { studies: number[]; releases: TrainingSource[]; skipped: number };

/** One stored model of a study. */
export type StoredModel = {
  id: number;
  studyId: number;
  version: number;
  model: SuggestionModelJson;
  report: ModelReport;
  training: TrainingRecord;
  createdAt: string;
};

/** One suggestion a rater may see (after their own vote). */
export type RaterSuggestion = { componentId: number; label: string; pNoise: number; modelVersion: number };

export type RaterSuggestionsPayload = { enabled: boolean; modelVersion: number | null; suggestions: RaterSuggestion[] };

export type StudySuggestionsPayload = {
  enabled: boolean;
  model: { id: number; version: number; createdAt: string; report: ModelReport; training: TrainingRecord } | null;
  training: { jobId: number; status: string; stage: string | null; percent: number | null; message: string | null } | null;
};
