import 'server-only';
import type { Role } from '@/lib/vocabulary/roles';
import { recordAudit } from '@/lib/db/queries/audit';
import { lockAccount, lockActiveAdmins, writeAccess } from '@/lib/db/queries/people';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';

export const LAST_ADMIN_MESSAGE =
  'This is the last active facility admin. Make another person a facility admin first, then change or deactivate this account.';

/**
 * Changes a user's role and/or active flag, refusing (409) to leave the facility without an
 * active admin. The admin rows are locked, so two admins demoting each other at once cannot both
 * succeed. Records one audit entry per change.
 */
export async function updateAccess({
  actorId,
  userId,
  role,
  active,
  ip = null,
}: {
  actorId: number;
  userId: number;
  role?: Role;
  active?: boolean;
  ip?: string | null;
}): Promise<{ id: number; role: Role; active: boolean }> {
  return inTransaction(async (trx) => {
    // lock every active admin row first (same order for every caller), then the target
    const admins = await lockActiveAdmins(trx);
    const target = await lockAccount(trx, { userId });
    if (!target) throw new AppError('not_found', 'That person was not found.');
    const before = { role: target.role, active: target.active };
    const after = { role: role ?? before.role, active: active ?? before.active };
    const wasActiveAdmin = before.role === 'admin' && before.active;
    const staysActiveAdmin = after.role === 'admin' && after.active;
    if (wasActiveAdmin && !staysActiveAdmin && admins.filter((id) => id !== userId).length === 0) {
      throw new AppError('conflict', LAST_ADMIN_MESSAGE);
    }
    if (after.role === before.role && after.active === before.active) return { id: userId, ...after };
    // deactivation ends every session; reactivation leaves the version raised, so they stay ended
    await writeAccess(trx, { userId, role: after.role, active: after.active, endSessions: before.active && !after.active });
    if (after.role !== before.role) {
      await recordAudit(
        {
          actorId,
          action: 'user.role_changed',
          targetType: 'user',
          targetId: userId,
          detail: { email: target.email, from: before.role, to: after.role },
          ip,
        },
        trx,
      );
    }
    if (after.active !== before.active) {
      await recordAudit(
        {
          actorId,
          action: after.active ? 'user.reactivated' : 'user.deactivated',
          targetType: 'user',
          targetId: userId,
          detail: { email: target.email },
          ip,
        },
        trx,
      );
    }
    return { id: userId, ...after };
  });
}
