import { handler } from '@/lib/api/handler';
import { memberParams } from '@/lib/studies/schema';
import { findManagedStudy, findStudyForUser } from '@/lib/db/queries/studies';
import { removeMember } from '@/lib/members/remove-member';
import { forbidden, notFound } from '@/lib/errors';

// DELETE /api/studies/:id/members/:userId – remove a member (never the last lead)
export const DELETE = handler({ permission: 'studies.update', params: memberParams }, async ({ user, params }) => {
  if (!(await findManagedStudy({ user, studyId: params.id }))) {
    if (await findStudyForUser({ user, studyId: params.id })) throw forbidden('changing the members of this study');
    throw notFound('The study');
  }
  await removeMember({ actor: user, studyId: params.id, userId: params.userId });
  return { ok: true };
});
