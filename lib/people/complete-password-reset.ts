import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { findAccountState, markLinkUsed, writePasswordEndingSessions } from '@/lib/db/queries/invitations';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { claimLink } from '@/lib/invitations/claim-link';

/** Sets a new password through a reset link and marks the link used (one transaction). */
export async function completePasswordReset({
  token,
  passwordHash,
  ip = null,
  now = new Date(),
}: {
  token: string;
  passwordHash: string;
  ip?: string | null;
  now?: Date;
}): Promise<{ userId: number }> {
  return inTransaction(async (trx) => {
    const link = await claimLink(trx, token, 'reset', now);
    const user = await findAccountState(trx, { userId: link.userId });
    if (!user || !user.active) throw new AppError('conflict', 'This account is deactivated. Ask the facility admin.');
    // a reset ends every session of the account (whoever knew the old password is signed out)
    await writePasswordEndingSessions(trx, { userId: user.id, passwordHash, now });
    await markLinkUsed(trx, { id: link.id, now });
    await recordAudit({ actorId: Number(user.id), action: 'password_reset.completed', targetType: 'user', targetId: user.id, ip }, trx);
    return { userId: Number(user.id) };
  });
}
