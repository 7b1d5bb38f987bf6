import { after } from 'next/server';
import { handler } from '@/lib/api/handler';
import { inviteSchema } from '@/lib/invitations/schema';
import { accountExists } from '@/lib/db/queries/people';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { leadsStudy } from '@/lib/auth/permissions';
import { createInvitation, listInvitations } from '@/lib/db/queries/invitations';
import { recordAudit } from '@/lib/db/queries/audit';
import { countAttempts, lockedFor } from '@/lib/auth/throttle';
import { auditAddress } from '@/lib/auth/client-address';
import { deliverMail } from '@/lib/mail/deliver';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { invitationMail } from '@/lib/mail/templates/invitation';
import { existingAccountMail } from '@/lib/mail/templates/existing-account';
import { AppError } from '@/lib/errors';
import { db } from '@/lib/db/knex';

// GET /api/invitations – invitations with their state (admins: all; leads: the ones they sent)
export const GET = handler({ permission: 'invitations.create' }, async ({ user }) => {
  const invitations = await listInvitations({ invitedBy: user.role === 'admin' ? undefined : user.id });
  return { invitations };
});

// POST /api/invitations – invite a person by e-mail. The answer is the same whether or not the
// address already has an account; the e-mail is written and sent after the response.
export const POST = handler({ permission: 'invitations.create', body: inviteSchema, what: 'The invitation' }, async ({ req, user, body }) => {
  if (user.role !== 'admin') {
    if (body.role !== 'rater' && body.role !== 'observer') {
      throw new AppError('forbidden', 'Study leads may invite raters and observers; ask the facility admin for other roles.');
    }
    if (body.studyRole === 'lead') throw new AppError('forbidden', 'Study leads may add raters and observers to their studies.');
    if (body.studyId && !leadsStudy(await findStudyAccess({ user, studyId: body.studyId }))) {
      throw new AppError('forbidden', 'You can invite people only to studies you lead.');
    }
  }
  let studyName: string | null = null;
  if (body.studyId) {
    const study = await db('studies').where({ id: body.studyId }).first('name');
    if (!study) throw new AppError('validation', 'That study was not found.', { studyId: ['That study was not found.'] });
    studyName = study.name;
  }
  const key = `invite:email:${body.email}` as const;
  const wait = await lockedFor(key);
  if (wait > 0) throw new AppError('too_many_requests', `Too many invitations to this address. Try again in ${Math.ceil(wait / 60000)} minutes.`);
  await countAttempts([key]);

  const base = publicBaseUrl(req.url);
  const facility = facilityName();
  const ip = auditAddress(req);
  after(async () => {
    try {
      if (await accountExists({ email: body.email })) {
        await recordAudit({ actorId: user.id, action: 'invitation.existing_account', targetType: 'email', targetId: null, studyId: body.studyId ?? null, detail: { email: body.email }, ip });
        await deliverMail({
          to: body.email,
          template: 'existing-account',
          content: existingAccountMail({ facility, inviterName: user.name, signInUrl: `${base}/sign-in`, forgotUrl: `${base}/reset-password` }),
        });
        return;
      }
      const { token, expiresAt } = await createInvitation({
        email: body.email,
        role: body.role,
        studyId: body.studyId ?? null,
        studyRole: body.studyRole ?? null,
        invitedBy: user.id,
      });
      await deliverMail({
        to: body.email,
        template: 'invite',
        content: invitationMail({ facility, inviterName: user.name, role: body.role, studyName, studyRole: body.studyRole, url: `${base}/invitations/${token}`, expiresAt }),
      });
    } catch (err) {
      console.error('[invitations] could not send an invitation:', err);
    }
  });
  return { ok: true, message: `An invitation is on its way to ${body.email}.` };
});
