import { handler } from '@/lib/api/handler';
import { acceptSchema } from '@/lib/invitations/schema';
import { acceptInvitation } from '@/lib/invitations/accept-invitation';
import { hashPassword } from '@/lib/auth/password';
import { countAttempts, lockedFor } from '@/lib/auth/throttle';
import { addressKey, auditAddress } from '@/lib/auth/client-address';
import { AppError } from '@/lib/errors';

// POST /api/invitations/accept – the invitee chooses a name and password; the link then stops working
export const POST = handler({ permission: 'public', body: acceptSchema, what: 'The account' }, async ({ req, body }) => {
  const ip = auditAddress(req);
  const key = addressKey('invite:link', req);
  const wait = key ? await lockedFor(key) : 0;
  if (wait > 0)
    throw new AppError('too_many_requests', `Too many attempts with invalid links. Try again in ${Math.ceil(wait / 60000)} minutes.`);
  const passwordHash = await hashPassword(body.password);
  try {
    const { email } = await acceptInvitation({ token: body.token, name: body.name, passwordHash, ip });
    return { ok: true, email };
  } catch (err) {
    if (err instanceof AppError && err.code === 'not_found') if (key) await countAttempts([key]);
    throw err;
  }
});
