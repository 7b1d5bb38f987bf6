/** A lead turns suggestions on or off for a study's raters (shown only after each rater's own vote). */
import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import type { Role } from '@/lib/vocabulary/roles';
import { recordAudit } from '@/lib/db/queries/audit';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { setSuggestionsEnabled } from '@/lib/db/queries/suggestions';
import { forbidden, notFound } from '@/lib/errors';

export async function changeSuggestionSettings({
  user,
  studyId,
  enabled,
}: {
  user: { id: number; role: Role };
  studyId: number;
  enabled: boolean;
}): Promise<{ enabled: boolean }> {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw forbidden('changing suggestions for this study (only its leads may)');
  await setSuggestionsEnabled({ studyId, enabled });
  await recordAudit({
    actorId: user.id,
    action: enabled ? 'suggestions.enabled' : 'suggestions.disabled',
    targetType: 'study',
    targetId: studyId,
    studyId,
  });
  return { enabled };
}
