import { handler } from '@/lib/api/handler';
import { studyIdParams, studyUpdateSchema } from '@/lib/studies/schema';
import { findManagedStudy, findStudyForUser, updateStudy } from '@/lib/db/queries/studies';
import { forbidden, notFound } from '@/lib/errors';

// GET /api/studies/:id – a study's protocol and the caller's access to it
export const GET = handler({ permission: 'studies.read', params: studyIdParams }, async ({ user, params }) => {
  const access = await findStudyForUser({ user, studyId: params.id });
  if (!access) throw notFound('The study');
  return access;
});

// PATCH /api/studies/:id – change the protocol (the study's leads and admins)
export const PATCH = handler(
  { permission: 'studies.update', params: studyIdParams, body: studyUpdateSchema, what: 'The protocol' },
  async ({ user, params, body }) => {
    const study = await findManagedStudy({ user, studyId: params.id });
    if (!study) {
      if (await findStudyForUser({ user, studyId: params.id })) throw forbidden('changing this study: only its leads and the facility admin may');
      throw notFound('The study');
    }
    await updateStudy({ user, studyId: params.id, values: body });
    return { ok: true };
  },
);
