import 'server-only';
import { mayHoldStudyRole, type StudyRole } from '@/lib/vocabulary/roles';
import { recordAudit } from '@/lib/db/queries/audit';
import { findAccountForMembership, listMembers, lockMembership, upsertMembership, type StudyMember } from '@/lib/db/queries/members';
import type { UserRow } from '@/lib/db/queries/users';
import { inTransaction } from '@/lib/db/transaction';
import { AppError, notFound } from '@/lib/errors';
import { assertAnotherLead } from './only-lead';

/**
 * Adds an existing, active account to a study by e-mail, or changes its study role. The account's
 * facility role must allow the study role. Audited.
 */
export async function addMember({
  actor,
  studyId,
  email,
  studyRole,
}: {
  actor: Pick<UserRow, 'id'>;
  studyId: number;
  email: string;
  studyRole: StudyRole;
}): Promise<StudyMember> {
  const account = await findAccountForMembership({ email });
  if (!account || !account.active) {
    throw new AppError('not_found', `No active account has the e-mail ${email}. Ask the facility admin to invite that person first.`, {
      email: ['No active account has this e-mail.'],
    });
  }
  if (!mayHoldStudyRole(account.role, studyRole)) {
    throw new AppError(
      'validation',
      `${account.name} has the facility role "${account.role}", which cannot be a study ${studyRole}. Choose another study role or ask the facility admin to change the account's role.`,
      { studyRole: [`A ${account.role} account cannot be a study ${studyRole}.`] },
    );
  }
  await inTransaction(async (trx) => {
    const existing = await lockMembership(trx, { studyId, userId: account.id });
    if (existing && existing.study_role === 'lead' && studyRole !== 'lead') await assertAnotherLead(trx, studyId, account.id);
    await upsertMembership(trx, { studyId, userId: account.id, studyRole, addedBy: actor.id });
    await recordAudit(
      {
        actorId: actor.id,
        action: existing ? 'study.member_role' : 'study.member_add',
        targetType: 'user',
        targetId: account.id,
        studyId,
        detail: { studyRole, before: existing?.study_role ?? null },
      },
      trx,
    );
  });
  const member = (await listMembers({ studyId })).find((m) => m.userId === Number(account.id));
  if (!member) throw notFound('The member');
  return member;
}
