import 'server-only';
import { db } from '@/lib/db/knex';
import type { Knex } from 'knex';
import type { Role } from '@/lib/vocabulary/roles';

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

/** The active admins' ids, every row locked (the same order for every caller). */
export async function lockActiveAdmins(trx: Knex.Transaction): Promise<number[]> {
  const admins: { id: number }[] = await trx('users').where({ role: 'admin', active: true }).orderBy('id').forUpdate().select('id');
  return admins.map((a) => a.id);
}

/** A user's role, active flag and e-mail, the row locked. */
export async function lockAccount(
  trx: Knex.Transaction,
  { userId }: { userId: number },
): Promise<{ id: number; role: Role; active: boolean; email: string } | null> {
  const target = await trx('users').where({ id: userId }).forUpdate().first('id', 'role', 'active', 'email');
  return target ? { id: target.id, role: target.role as Role, active: Boolean(target.active), email: target.email } : null;
}

/** Writes a user's role and active flag; `endSessions` raises the session version (signs them out everywhere). */
export async function writeAccess(
  trx: Knex.Transaction,
  { userId, role, active, endSessions }: { userId: number; role: Role; active: boolean; endSessions: boolean },
): Promise<void> {
  const bump = endSessions ? { session_version: trx.raw('session_version + 1') } : {};
  await trx('users')
    .where({ id: userId })
    .update({ role, active, ...bump, updated_at: trx.fn.now(3) });
}
