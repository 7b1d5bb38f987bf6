import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { deleteMembership, lockMembership } from '@/lib/db/queries/members';
import type { UserRow } from '@/lib/db/queries/users';
import { inTransaction } from '@/lib/db/transaction';
import { notFound } from '@/lib/errors';
import { assertAnotherLead } from './only-lead';

/** Removes a member (never the last lead). Their assignments and votes stay. Audited. */
export async function removeMember({
  actor,
  studyId,
  userId,
}: {
  actor: Pick<UserRow, 'id'>;
  studyId: number;
  userId: number;
}): Promise<void> {
  await inTransaction(async (trx) => {
    const existing = await lockMembership(trx, { studyId, userId });
    if (!existing) throw notFound('The member');
    if (existing.study_role === 'lead') await assertAnotherLead(trx, studyId, userId);
    await deleteMembership(trx, { studyId, userId });
    await recordAudit(
      {
        actorId: actor.id,
        action: 'study.member_remove',
        targetType: 'user',
        targetId: userId,
        studyId,
        detail: { studyRole: existing.study_role },
      },
      trx,
    );
  });
}
