import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { accountWithEmailExists, insertInvitedAccount, markLinkUsed } from '@/lib/db/queries/invitations';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { claimLink } from './claim-link';

/**
 * Accepts an invitation: creates the account with the invited role (and study membership),
 * marks the link used — all in one transaction, so a link works exactly once.
 */
export async function acceptInvitation({
  token,
  name,
  passwordHash,
  ip = null,
  now = new Date(),
}: {
  token: string;
  name: string;
  passwordHash: string;
  ip?: string | null;
  now?: Date;
}): Promise<{ userId: number; email: string }> {
  return inTransaction(async (trx) => {
    const link = await claimLink(trx, token, 'invite', now);
    if (await accountWithEmailExists(trx, { email: link.email })) {
      throw new AppError('conflict', 'An account already exists for this address. Sign in, or use “Forgot your password?”.');
    }
    const userId = await insertInvitedAccount(trx, { link, name, passwordHash });
    await markLinkUsed(trx, { id: link.id, now, userId });
    await recordAudit(
      {
        actorId: userId,
        action: 'invitation.accepted',
        targetType: 'invitation',
        targetId: link.id,
        studyId: link.studyId,
        detail: { email: link.email, role: link.role },
        ip,
      },
      trx,
    );
    return { userId, email: link.email };
  });
}
