import { handler } from '@/lib/api/handler';
import { changePasswordSchema } from '@/lib/auth/schemas';
import { hashPassword, verifyPassword } from '@/lib/auth/password';
import { findPasswordHash, updatePasswordHash } from '@/lib/db/queries/users';
import { recordAudit } from '@/lib/db/queries/audit';
import { reissuedSessionCookie } from '@/lib/auth/reissue';
import { AppError } from '@/lib/errors';

// POST /api/account/password – change one's own password (the current one is required); the
// account's other sessions end, this one is re-issued with the new session version
export const POST = handler(
  { permission: 'account.update', body: changePasswordSchema, what: 'The password change' },
  async ({ req, user, body }) => {
    const hash = await findPasswordHash({ id: user.id });
    if (!hash || !(await verifyPassword(body.currentPassword, hash))) {
      throw new AppError('validation', 'The current password is wrong.', { currentPassword: ['The current password is wrong.'] });
    }
    // every session of the account ends (someone may know the old password) except this one
    const sv = await updatePasswordHash({ id: user.id, passwordHash: await hashPassword(body.newPassword) });
    await recordAudit({ actorId: user.id, action: 'account.password_changed', targetType: 'user', targetId: user.id });
    const cookie = await reissuedSessionCookie(req, { userId: user.id, sv });
    return Response.json({ ok: true }, { headers: cookie ? { 'set-cookie': cookie } : {} });
  },
);
