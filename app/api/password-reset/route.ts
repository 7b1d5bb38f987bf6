import { after } from 'next/server';
import { handler } from '@/lib/api/handler';
import { RESET_SENT_MESSAGE, resetRequestSchema } from './schema';
import { findAccountForReset } from '@/lib/db/queries/people';
import { createPasswordReset } from '@/lib/db/queries/invitations';
import { countAttempts, lockedFor } from '@/lib/auth/throttle';
import { addressKey, auditAddress } from '@/lib/auth/client-address';
import { deliverMail } from '@/lib/mail/deliver';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { passwordResetMail } from '@/lib/mail/templates/password-reset';
import { AppError } from '@/lib/errors';

// POST /api/password-reset – ask for a reset link. Same answer, and the same work before it, for
// every address: the lookup and the e-mail happen after the response.
export const POST = handler({ permission: 'public', body: resetRequestSchema, what: 'The reset request' }, async ({ req, body }) => {
  const ip = auditAddress(req);
  const keys = [addressKey('reset:ip', req), `reset:email:${body.email}` as const].filter((k) => k !== null);
  const wait = Math.max(...(await Promise.all(keys.map(lockedFor))));
  if (wait > 0) throw new AppError('too_many_requests', `Too many reset requests. Try again in ${Math.ceil(wait / 60000)} minutes.`);
  await countAttempts(keys);
  const base = publicBaseUrl(req.url);
  const facility = facilityName();
  after(async () => {
    try {
      const account = await findAccountForReset({ email: body.email });
      if (!account || !account.active) return;
      const { token, expiresAt } = await createPasswordReset({ userId: account.id, email: body.email, ip });
      await deliverMail({
        to: body.email,
        template: 'reset',
        content: passwordResetMail({ facility, name: account.name, url: `${base}/reset-password/${token}`, expiresAt }),
      });
    } catch (err) {
      console.error('[password-reset] could not send a reset link:', err);
    }
  });
  return { ok: true, message: RESET_SENT_MESSAGE };
});
