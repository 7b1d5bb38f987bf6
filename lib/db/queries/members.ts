import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';
import type { Role, StudyRole } from '@/lib/vocabulary/roles';

export type StudyMember = {
  userId: number;
  name: string;
  email: string;
  role: Role;
  studyRole: StudyRole;
  addedAt: Date;
};

/** The members of a study with their account role (no other account columns). */
export async function listMembers({ studyId }: { studyId: number }): Promise<StudyMember[]> {
  const rows = await db('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where('m.study_id', studyId)
    .select('u.id as userId', 'u.name', 'u.email', 'u.role', 'm.study_role as studyRole', 'm.created_at as addedAt')
    .orderByRaw("FIELD(m.study_role, 'lead', 'rater', 'observer'), u.name");
  return rows.map((r) => ({ ...r, userId: Number(r.userId) }));
}

/** An account by e-mail, for adding it to a study. */
export async function findAccountForMembership({
  email,
}: {
  email: string;
}): Promise<{ id: number; name: string; role: Role; active: boolean } | undefined> {
  return db('users').where({ email: email.trim().toLowerCase() }).first('id', 'name', 'role', 'active');
}

/** The member's study role, the row locked for the caller's transaction. */
export async function lockMembership(
  trx: Knex.Transaction,
  { studyId, userId }: { studyId: number; userId: number },
): Promise<{ study_role: StudyRole } | undefined> {
  return trx('study_members').where({ study_id: studyId, user_id: userId }).forUpdate().first('study_role');
}

/** How many leads the study has besides `userId`. */
export async function countOtherLeads(trx: Knex.Transaction, { studyId, userId }: { studyId: number; userId: number }): Promise<number> {
  const others = await trx('study_members')
    .where({ study_id: studyId, study_role: 'lead' })
    .whereNot({ user_id: userId })
    .count({ n: '*' });
  return Number(others[0].n);
}

/** Adds a member, or changes the study role of one. */
export async function upsertMembership(
  trx: Knex.Transaction,
  { studyId, userId, studyRole, addedBy }: { studyId: number; userId: number; studyRole: StudyRole; addedBy: number },
): Promise<void> {
  await trx('study_members')
    .insert({ study_id: studyId, user_id: userId, study_role: studyRole, added_by: addedBy })
    .onConflict(['study_id', 'user_id'])
    .merge(['study_role']);
}

export async function deleteMembership(trx: Knex.Transaction, { studyId, userId }: { studyId: number; userId: number }): Promise<void> {
  await trx('study_members').where({ study_id: studyId, user_id: userId }).delete();
}

export type AccountCandidate = { userId: number; name: string; email: string; role: Role; studyRole: StudyRole | null };

/**
 * Active accounts whose name or e-mail contains `q` (case-insensitive; % and _ match literally),
 * by name, at most `limit` (one more is read to tell whether there are more), with the study role
 * each already holds in the study. Only what the member picker shows: id, name, e-mail, facility
 * role — never deactivated accounts, sign-in times or anything else of the account.
 */
export async function searchAccounts({
  studyId,
  q,
  limit,
}: {
  studyId: number;
  q: string;
  limit: number;
}): Promise<{ accounts: AccountCandidate[]; more: boolean }> {
  const like = `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
  const rows = await db('users as u')
    .leftJoin('study_members as m', function () {
      this.on('m.user_id', 'u.id').andOn('m.study_id', db.raw('?', [studyId]));
    })
    .where('u.active', true)
    .andWhere((w) => w.where('u.name', 'like', like).orWhere('u.email', 'like', like))
    .orderBy(['u.name', 'u.id'])
    .limit(limit + 1)
    .select('u.id as userId', 'u.name', 'u.email', 'u.role', 'm.study_role as studyRole');
  return {
    accounts: rows
      .slice(0, limit)
      .map((r) => ({ userId: Number(r.userId), name: r.name, email: r.email, role: r.role, studyRole: r.studyRole ?? null })),
    more: rows.length > limit,
  };
}
