import { handler } from '@/lib/api/handler';
import { idParams } from '@/lib/invitations/schema';
import { revokeInvitation } from '@/lib/invitations/revoke-invitation';
import { findInvitationSender } from '@/lib/db/queries/invitations';
import { notFound } from '@/lib/errors';

// DELETE /api/invitations/:id – withdraw an unused invitation (admins: any; leads: their own)
export const DELETE = handler({ permission: 'invitations.create', params: idParams, what: 'The invitation' }, async ({ user, params }) => {
  const row = await findInvitationSender({ id: params.id });
  if (!row || (user.role !== 'admin' && row.invitedBy !== user.id)) throw notFound('The invitation');
  const done = await revokeInvitation({ id: params.id, actorId: user.id });
  if (!done) throw notFound('An unused invitation with that number');
  return { ok: true };
});
