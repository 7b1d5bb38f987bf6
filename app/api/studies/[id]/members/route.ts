import { handler } from '@/lib/api/handler';
import { memberSchema, studyIdParams } from '@/lib/studies/schema';
import { listMembers } from '@/lib/db/queries/members';
import { addMember } from '@/lib/members/add-member';

// GET /api/studies/:id/members – the study's members and their study roles (members of the study, admins)
export const GET = handler({ permission: 'studies.read', params: studyIdParams, scope: 'study' }, async ({ access }) => ({
  members: await listMembers({ studyId: access.studyId }),
}));

// POST /api/studies/:id/members – add an existing account by e-mail, or change its study role
export const POST = handler(
  {
    permission: 'studies.update',
    params: studyIdParams,
    body: memberSchema,
    what: 'The member',
    scope: 'study',
    studyRule: 'lead',
    denied: 'changing the members of this study',
  },
  async ({ user, access, body }) => ({
    member: await addMember({ actor: user, studyId: access.studyId, email: body.email, studyRole: body.studyRole }),
  }),
);
