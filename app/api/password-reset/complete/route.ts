import { handler } from '@/lib/api/handler';
import { resetCompleteSchema } from '../schema';
import { completePasswordReset } from '@/lib/people/complete-password-reset';
import { hashPassword } from '@/lib/auth/password';
import { countAttempts, lockedFor } from '@/lib/auth/throttle';
import { addressKey, auditAddress } from '@/lib/auth/client-address';
import { AppError } from '@/lib/errors';

// POST /api/password-reset/complete – set a new password through a reset link (works once, for one hour)
export const POST = handler({ permission: 'public', body: resetCompleteSchema, what: 'The new password' }, async ({ req, body }) => {
  const ip = auditAddress(req);
  const key = addressKey('reset:link', req);
  const wait = key ? await lockedFor(key) : 0;
  if (wait > 0)
    throw new AppError('too_many_requests', `Too many attempts with invalid links. Try again in ${Math.ceil(wait / 60000)} minutes.`);
  const passwordHash = await hashPassword(body.password);
  try {
    await completePasswordReset({ token: body.token, passwordHash, ip });
    return { ok: true };
  } catch (err) {
    if (err instanceof AppError && err.code === 'not_found') if (key) await countAttempts([key]);
    throw err;
  }
});
