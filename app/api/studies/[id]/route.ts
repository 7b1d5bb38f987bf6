import { handler } from '@/lib/api/handler';
import { studyIdParams, studyUpdateSchema } from '@/lib/studies/schema';
import { findStudyForUser } from '@/lib/studies/find-study-for-user';
import { updateStudy } from '@/lib/studies/update-study';
import { notFound } from '@/lib/errors';

// GET /api/studies/:id – a study's protocol and the caller's access to it
export const GET = handler({ permission: 'studies.read', params: studyIdParams }, async ({ user, params }) => {
  const access = await findStudyForUser({ user, studyId: params.id });
  if (!access) throw notFound('The study');
  return access;
});

// PATCH /api/studies/:id – change the protocol (the study's leads and admins)
export const PATCH = handler(
  {
    permission: 'studies.update',
    params: studyIdParams,
    body: studyUpdateSchema,
    what: 'The protocol',
    scope: 'study',
    studyRule: 'lead',
    denied: 'changing this study: only its leads and the facility admin may',
  },
  async ({ user, access, body }) => {
    await updateStudy({ user, studyId: access.studyId, values: body });
    return { ok: true };
  },
);
