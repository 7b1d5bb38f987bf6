/** The exported suggestion model document (download and release ZIP): version, training releases, report and the model JSON. */
import type { StoredModelRow } from '@/lib/db/queries/suggestions';
import type { SuggestionModelJson } from './model';

export function suggestionModelDocument(m: StoredModelRow) {
  return {
    Description:
      'The suggestion model in use when this was written: P(noise) of a component from its features. Suggestions are shown to a rater only after their own vote.',
    studyId: m.studyId,
    version: m.version,
    createdAt: m.createdAt,
    training: m.training,
    report: m.report,
    ...(m.model as SuggestionModelJson), // the document insertSuggestionModel stored
  };
}
