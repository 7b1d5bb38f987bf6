import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { lockUnusedInvitation, markLinksRevoked } from '@/lib/db/queries/invitations';
import { inTransaction } from '@/lib/db/transaction';

/** Withdraws an unused invitation. Returns false when there is none to withdraw. */
export async function revokeInvitation({ id, actorId, now = new Date() }: { id: number; actorId: number; now?: Date }): Promise<boolean> {
  return inTransaction(async (trx) => {
    const row = await lockUnusedInvitation(trx, { id });
    if (!row) return false;
    await markLinksRevoked(trx, { ids: [id], now });
    await recordAudit(
      {
        actorId,
        action: 'invitation.revoked',
        targetType: 'invitation',
        targetId: id,
        studyId: row.study_id,
        detail: { email: row.email },
      },
      trx,
    );
    return true;
  });
}
