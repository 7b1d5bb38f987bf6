import { handler } from '@/lib/api/handler';
import { changePasswordSchema } from '@/lib/auth/schemas';
import { hashPassword, verifyPassword } from '@/lib/auth/password';
import { findPasswordHash, updatePasswordHash } from '@/lib/db/queries/users';
import { recordAudit } from '@/lib/db/queries/audit';
import { AppError } from '@/lib/errors';

// POST /api/account/password – change one's own password (the current one is required)
export const POST = handler(
  { permission: 'account.update', body: changePasswordSchema, what: 'The password change' },
  async ({ user, body }) => {
    const hash = await findPasswordHash({ id: user.id });
    if (!hash || !(await verifyPassword(body.currentPassword, hash))) {
      throw new AppError('validation', 'The current password is wrong.', { currentPassword: ['The current password is wrong.'] });
    }
    await updatePasswordHash({ id: user.id, passwordHash: await hashPassword(body.newPassword) });
    await recordAudit({ actorId: user.id, action: 'account.password_changed', targetType: 'user', targetId: user.id });
    return { ok: true };
  },
);
