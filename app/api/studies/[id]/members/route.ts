import { handler } from '@/lib/api/handler';
import { memberSchema, studyIdParams } from '@/lib/studies/schema';
import { findManagedStudy, findStudyForUser } from '@/lib/db/queries/studies';
import { listMembers } from '@/lib/db/queries/members';
import { addMember } from '@/lib/members/add-member';
import { forbidden, notFound } from '@/lib/errors';

// GET /api/studies/:id/members – the study's members and their study roles (members of the study, admins)
export const GET = handler({ permission: 'studies.read', params: studyIdParams }, async ({ user, params }) => {
  if (!(await findStudyForUser({ user, studyId: params.id }))) throw notFound('The study');
  return { members: await listMembers({ studyId: params.id }) };
});

// POST /api/studies/:id/members – add an existing account by e-mail, or change its study role
export const POST = handler(
  { permission: 'studies.update', params: studyIdParams, body: memberSchema, what: 'The member' },
  async ({ user, params, body }) => {
    if (!(await findManagedStudy({ user, studyId: params.id }))) {
      if (await findStudyForUser({ user, studyId: params.id })) throw forbidden('changing the members of this study');
      throw notFound('The study');
    }
    return { member: await addMember({ actor: user, studyId: params.id, email: body.email, studyRole: body.studyRole }) };
  },
);
