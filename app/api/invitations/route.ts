import { handler } from '@/lib/api/handler';
import { inviteSchema } from '@/lib/invitations/schema';
import { listInvitations } from '@/lib/invitations/list-invitations';
import { auditAddress } from '@/lib/auth/client-address';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { sendInvitation } from '@/lib/invitations/send-invitation';

// GET /api/invitations – invitations with their state (admins: all; leads: the ones they sent)
export const GET = handler({ permission: 'invitations.create' }, async ({ user }) => {
  const invitations = await listInvitations({ invitedBy: user.role === 'admin' ? undefined : user.id });
  return { invitations };
});

// POST /api/invitations – invite a person by e-mail (lib/invitations/send-invitation.ts). The answer
// says what happened: sent, a pending invitation replaced (only with `replace: true`, 409 before),
// or no invitation because the address already has an account. The worker sends the e-mail (send-mail job).
export const POST = handler(
  { permission: 'invitations.create', body: inviteSchema, what: 'The invitation' },
  async ({ req, user, body }) => {
    const outcome = await sendInvitation({
      user,
      input: body,
      baseUrl: publicBaseUrl(req.url),
      facility: facilityName(),
      ip: auditAddress(req),
    });
    return { ok: true, ...outcome };
  },
);
