import 'server-only';
import { revokeAccessToken } from '@/lib/db/queries/access-tokens';
import { recordAudit } from '@/lib/db/queries/audit';
import { inTransaction } from '@/lib/db/transaction';
import { notFound } from '@/lib/errors';

/** Revokes one of the caller's own live tokens and audits it, in one transaction; 404 otherwise. */
export async function revokeToken({ userId, tokenId }: { userId: number; tokenId: number }): Promise<void> {
  await inTransaction(async (trx) => {
    if (!(await revokeAccessToken({ userId, tokenId }, trx))) throw notFound('The token');
    await recordAudit({ actorId: userId, action: 'token.revoke', targetType: 'personal_access_token', targetId: tokenId }, trx);
  });
}
