import { after } from 'next/server';
import { handler } from '@/lib/api/handler';
import { RESET_SENT_MESSAGE, resetRequestSchema } from './schema';
import { countAttempts, lockedFor } from '@/lib/auth/throttle';
import { addressKey, auditAddress } from '@/lib/auth/client-address';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { AppError } from '@/lib/errors';
import { requestPasswordReset } from '@/lib/people/request-password-reset';

// POST /api/password-reset – ask for a reset link. Same answer, and the same work before it, for
// every address: the lookup and the queueing of the e-mail happen after the response; the worker
// sends it (send-mail job, with retries).
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
      await requestPasswordReset({ email: body.email, ip, baseUrl: base, facility });
    } catch (err) {
      console.error('[password-reset] could not queue a reset link:', err);
    }
  });
  return { ok: true, message: RESET_SENT_MESSAGE };
});
