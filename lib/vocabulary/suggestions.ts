/** Shapes of the suggestion records the database keeps (a leaf: imports nothing). The model and its report are typed in lib/suggestions. */

/** A release whose decisions trained a model. */
export type TrainingSource = { releaseId: number; studyId: number; runId: number | null; version: number };

/** What a model was trained on (stored with it). */
export type TrainingRecord = { studies: number[]; releases: TrainingSource[]; skipped: number };

/** One suggestion a rater may see (after their own vote). */
export type RaterSuggestion = { componentId: number; label: string; pNoise: number; modelVersion: number };
