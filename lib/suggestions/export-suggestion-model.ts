/**
 * The exported suggestion model: the model JSON (coefficients or trees, feature definitions with
 * the imputation), its version, the releases it learnt from and its cross-validated report.
 * The same document goes into the release ZIP (suggestion-model.json).
 */
import 'server-only';
import type { Role } from '@/lib/vocabulary/roles';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { activeSuggestionModel } from '@/lib/db/queries/suggestions';
import { suggestionModelDocument } from './model-document';
import { notFound } from '@/lib/errors';

export async function exportSuggestionModel({ user, studyId }: { user: { id: number; role: Role }; studyId: number }) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  const m = await activeSuggestionModel({ studyId });
  if (!m) throw notFound('A trained suggestion model');
  return { fileName: `study-${studyId}_suggestion-model-v${m.version}.json`, json: suggestionModelDocument(m) };
}
