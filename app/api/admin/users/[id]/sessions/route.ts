import { handler } from '@/lib/api/handler';
import { userIdParams } from '@/lib/people/schema';
import { auditAddress } from '@/lib/auth/client-address';
import { endAllSessions } from '@/lib/db/queries/sessions';
import { findUserById } from '@/lib/db/queries/users';
import { recordAudit } from '@/lib/db/queries/audit';
import { notFound } from '@/lib/errors';

// DELETE /api/admin/users/:id/sessions – "sign out everywhere": every session of that person ends now
export const DELETE = handler({ permission: 'users.manage', params: userIdParams, what: 'The sign-out' }, async ({ req, user, params }) => {
  const target = await findUserById({ id: params.id });
  if (!target) throw notFound('That person');
  await endAllSessions({ userId: target.id });
  await recordAudit({
    actorId: user.id,
    action: 'user.signed_out_everywhere',
    targetType: 'user',
    targetId: target.id,
    detail: { email: target.email },
    ip: auditAddress(req),
  });
  return { ok: true };
});
