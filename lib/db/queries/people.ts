import 'server-only';
import { db } from '@/lib/db/knex';
import { recordAudit } from '@/lib/db/queries/audit';
import type { Role } from '@/lib/auth/roles';
import { AppError } from '@/lib/errors';

export type Membership = { userId: number; studyId: number; studyName: string; studyRole: 'lead' | 'rater' | 'observer' };

export type Person = {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  lastSignInAt: Date | null;
  createdAt: Date;
  memberships: Membership[];
};

/** Every account with its study memberships (facility admin). No password hashes. */
export async function listPeople(): Promise<Person[]> {
  const users = await db('users')
    .select('id', 'email', 'name', 'role', 'active', 'last_sign_in_at as lastSignInAt', 'created_at as createdAt')
    .orderBy('name');
  const memberships = await listMemberships({});
  const byUser = new Map<number, Membership[]>();
  for (const m of memberships) byUser.set(m.userId, [...(byUser.get(m.userId) ?? []), m]);
  return users.map((u) => ({ ...u, active: Boolean(u.active), memberships: byUser.get(u.id) ?? [] }));
}

/** Study memberships, of one user or of everyone. */
export async function listMemberships({ userId }: { userId?: number }): Promise<Membership[]> {
  const q = db('study_members as m')
    .join('studies as s', 's.id', 'm.study_id')
    .select('m.user_id as userId', 'm.study_id as studyId', 's.name as studyName', 'm.study_role as studyRole')
    .orderBy('s.name');
  if (userId) q.where('m.user_id', userId);
  return q;
}

/** Studies a user may invite people to: all (admin) or those they lead. */
export async function invitableStudies({ userId, role }: { userId: number; role: Role }): Promise<{ id: number; name: string }[]> {
  const q = db('studies as s').select('s.id', 's.name').where('s.archived', false).orderBy('s.name');
  if (role !== 'admin') q.join('study_members as m', 'm.study_id', 's.id').where({ 'm.user_id': userId, 'm.study_role': 'lead' });
  return q;
}

/** The account for a reset request: id, name, active (nothing else leaves this query). */
export async function findAccountForReset({ email }: { email: string }): Promise<{ id: number; name: string; active: boolean } | null> {
  const row = await db('users').select('id', 'name', 'active').where({ email }).first();
  return row ? { id: row.id, name: row.name, active: Boolean(row.active) } : null;
}

/** True when an account exists for the address (used only after the response, never in it). */
export async function accountExists({ email }: { email: string }): Promise<boolean> {
  return Boolean(await db('users').where({ email }).first('id'));
}

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
  return db.transaction(async (trx) => {
    // lock every active admin row first (same order for every caller), then the target
    const admins: { id: number }[] = await trx('users').where({ role: 'admin', active: true }).orderBy('id').forUpdate().select('id');
    const target = await trx('users').where({ id: userId }).forUpdate().first('id', 'role', 'active', 'email');
    if (!target) throw new AppError('not_found', 'That person was not found.');
    const before = { role: target.role as Role, active: Boolean(target.active) };
    const after = { role: role ?? before.role, active: active ?? before.active };
    const wasActiveAdmin = before.role === 'admin' && before.active;
    const staysActiveAdmin = after.role === 'admin' && after.active;
    if (wasActiveAdmin && !staysActiveAdmin && admins.filter((a) => a.id !== userId).length === 0) {
      throw new AppError('conflict', LAST_ADMIN_MESSAGE);
    }
    if (after.role === before.role && after.active === before.active) return { id: userId, ...after };
    // deactivation ends every session; reactivation leaves the version raised, so they stay ended
    const endSessions = before.active && !after.active ? { session_version: trx.raw('session_version + 1') } : {};
    await trx('users').where({ id: userId }).update({ role: after.role, active: after.active, ...endSessions, updated_at: trx.fn.now(3) });
    if (after.role !== before.role) {
      await recordAudit({ actorId, action: 'user.role_changed', targetType: 'user', targetId: userId, detail: { email: target.email, from: before.role, to: after.role }, ip }, trx);
    }
    if (after.active !== before.active) {
      await recordAudit({ actorId, action: after.active ? 'user.reactivated' : 'user.deactivated', targetType: 'user', targetId: userId, detail: { email: target.email }, ip }, trx);
    }
    return { id: userId, ...after };
  });
}
