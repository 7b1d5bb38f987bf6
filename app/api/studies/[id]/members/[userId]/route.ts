import { handler } from '@/lib/api/handler';
import { memberParams } from '@/lib/studies/schema';
import { removeMember } from '@/lib/members/remove-member';

// DELETE /api/studies/:id/members/:userId – remove a member (never the last lead)
export const DELETE = handler(
  { permission: 'studies.update', params: memberParams, scope: 'study', studyRule: 'lead', denied: 'changing the members of this study' },
  async ({ user, access, params }) => {
    await removeMember({ actor: user, studyId: access.studyId, userId: params.userId });
    return { ok: true };
  },
);
