import 'server-only';
import { inviteTtlMs, newToken } from '@/lib/auth/tokens';
import type { Role, StudyRole } from '@/lib/vocabulary/roles';
import { recordAudit } from '@/lib/db/queries/audit';
import { insertInvitation, lockUnusedInvitations, markLinksRevoked } from '@/lib/db/queries/invitations';
import { inTransaction } from '@/lib/db/transaction';

/**
 * Writes a new invitation and withdraws earlier unused ones to the same address, each withdrawal
 * audited (invitation.revoked, reason "replaced", with the new invitation's id).
 * Returns the token for the e-mail (it is not stored).
 */
export async function createInvitation({
  email,
  role,
  studyId = null,
  studyRole = null,
  invitedBy,
  ttlMs = inviteTtlMs(),
  now = new Date(),
}: {
  email: string;
  role: Role;
  studyId?: number | null;
  studyRole?: StudyRole | null;
  invitedBy: number;
  ttlMs?: number;
  now?: Date;
}): Promise<{ id: number; token: string; expiresAt: Date }> {
  const { token, hash } = newToken();
  const expiresAt = new Date(now.getTime() + ttlMs);
  const id = await inTransaction(async (trx) => {
    const earlier = await lockUnusedInvitations(trx, { email });
    if (earlier.length) await markLinksRevoked(trx, { ids: earlier.map((e) => e.id), now });
    const inserted = await insertInvitation(trx, { tokenHash: hash, email, role, studyId, studyRole, invitedBy, expiresAt, now });
    await recordAudit(
      {
        actorId: invitedBy,
        action: 'invitation.sent',
        targetType: 'invitation',
        targetId: inserted,
        studyId,
        detail: { email, role, studyRole },
      },
      trx,
    );
    for (const e of earlier) {
      await recordAudit(
        {
          actorId: invitedBy,
          action: 'invitation.revoked',
          targetType: 'invitation',
          targetId: e.id,
          studyId: e.study_id ?? null,
          detail: { email, reason: 'replaced', replacedBy: inserted, role: e.role, studyRole: e.study_role ?? null },
        },
        trx,
      );
    }
    return inserted;
  });
  return { id, token, expiresAt };
}
