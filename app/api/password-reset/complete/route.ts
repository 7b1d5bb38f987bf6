import { handler } from '@/lib/api/handler';
import { resetCompleteSchema } from '../schema';
import { completePasswordReset } from '@/lib/db/queries/invitations';
import { hashPassword } from '@/lib/auth/password';
import { countAttempts, lockedFor } from '@/lib/auth/throttle';
import { clientAddress } from '@/lib/auth/client-address';
import { AppError } from '@/lib/errors';

// POST /api/password-reset/complete – set a new password through a reset link (works once, for one hour)
export const POST = handler({ permission: 'public', body: resetCompleteSchema, what: 'The new password' }, async ({ req, body }) => {
  const ip = clientAddress(req);
  const key = `reset:link:${ip}` as const;
  const wait = await lockedFor(key);
  if (wait > 0) throw new AppError('too_many_requests', `Too many attempts with invalid links. Try again in ${Math.ceil(wait / 60000)} minutes.`);
  const passwordHash = await hashPassword(body.password);
  try {
    await completePasswordReset({ token: body.token, passwordHash, ip });
    return { ok: true };
  } catch (err) {
    if (err instanceof AppError && err.code === 'not_found') await countAttempts([key]);
    throw err;
  }
});
