import 'server-only';
import { newToken, RESET_TTL_MS } from '@/lib/auth/tokens';
import { recordAudit } from '@/lib/db/queries/audit';
import { insertPasswordReset, revokeUnusedResets } from '@/lib/db/queries/invitations';
import { inTransaction } from '@/lib/db/transaction';

/** Writes a password-reset link for a user (one hour) and withdraws their earlier unused ones. */
export async function createPasswordReset({
  userId,
  email,
  ip = null,
  ttlMs = RESET_TTL_MS,
  now = new Date(),
}: {
  userId: number;
  email: string;
  ip?: string | null;
  ttlMs?: number;
  now?: Date;
}): Promise<{ id: number; token: string; expiresAt: Date }> {
  const { token, hash } = newToken();
  const expiresAt = new Date(now.getTime() + ttlMs);
  const id = await inTransaction(async (trx) => {
    await revokeUnusedResets(trx, { userId, now });
    const inserted = await insertPasswordReset(trx, { tokenHash: hash, email, userId, expiresAt, now });
    await recordAudit({ actorId: null, action: 'password_reset.requested', targetType: 'user', targetId: userId, ip }, trx);
    return inserted;
  });
  return { id, token, expiresAt };
}
