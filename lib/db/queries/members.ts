import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';
import { recordAudit } from './audit';
import { AppError, notFound } from '@/lib/errors';
import { mayHoldStudyRole, type Role } from '@/lib/auth/roles';
import type { StudyRole } from '@/lib/studies/labels';
import type { UserRow } from './users';

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

/**
 * Adds an existing, active account to a study by e-mail, or changes its study role. The account's
 * facility role must allow the study role. Audited.
 */
export async function addMember({ actor, studyId, email, studyRole }: { actor: Pick<UserRow, 'id'>; studyId: number; email: string; studyRole: StudyRole }): Promise<StudyMember> {
  const account = await db('users').where({ email: email.trim().toLowerCase() }).first('id', 'name', 'role', 'active');
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
  await db.transaction(async (trx: Knex.Transaction) => {
    const existing = await trx('study_members').where({ study_id: studyId, user_id: account.id }).forUpdate().first('study_role');
    if (existing && existing.study_role === 'lead' && studyRole !== 'lead') await assertAnotherLead(trx, studyId, account.id);
    await trx('study_members')
      .insert({ study_id: studyId, user_id: account.id, study_role: studyRole, added_by: actor.id })
      .onConflict(['study_id', 'user_id'])
      .merge(['study_role']);
    await recordAudit(
      { actorId: actor.id, action: existing ? 'study.member_role' : 'study.member_add', targetType: 'user', targetId: account.id, studyId, detail: { studyRole, before: existing?.study_role ?? null } },
      trx,
    );
  });
  const member = (await listMembers({ studyId })).find((m) => m.userId === Number(account.id));
  if (!member) throw notFound('The member');
  return member;
}

async function assertAnotherLead(trx: Knex.Transaction, studyId: number, userId: number) {
  const others = await trx('study_members').where({ study_id: studyId, study_role: 'lead' }).whereNot({ user_id: userId }).count({ n: '*' });
  if (Number(others[0].n) === 0) {
    throw new AppError('conflict', 'This is the study\'s only lead. Add another lead first, then change or remove this one.');
  }
}

/** Removes a member (never the last lead). Their assignments and votes stay. Audited. */
export async function removeMember({ actor, studyId, userId }: { actor: Pick<UserRow, 'id'>; studyId: number; userId: number }): Promise<void> {
  await db.transaction(async (trx: Knex.Transaction) => {
    const existing = await trx('study_members').where({ study_id: studyId, user_id: userId }).forUpdate().first('study_role');
    if (!existing) throw notFound('The member');
    if (existing.study_role === 'lead') await assertAnotherLead(trx, studyId, userId);
    await trx('study_members').where({ study_id: studyId, user_id: userId }).delete();
    await recordAudit({ actorId: actor.id, action: 'study.member_remove', targetType: 'user', targetId: userId, studyId, detail: { studyRole: existing.study_role } }, trx);
  });
}

export type AccountCandidate = { userId: number; name: string; email: string; role: Role; studyRole: StudyRole | null };

/**
 * Active accounts whose name or e-mail contains `q` (case-insensitive; % and _ match literally),
 * by name, at most `limit` (one more is read to tell whether there are more), with the study role
 * each already holds in the study. Only what the member picker shows: id, name, e-mail, facility
 * role — never deactivated accounts, sign-in times or anything else of the account.
 */
export async function searchAccounts({ studyId, q, limit }: { studyId: number; q: string; limit: number }): Promise<{ accounts: AccountCandidate[]; more: boolean }> {
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
    accounts: rows.slice(0, limit).map((r) => ({ userId: Number(r.userId), name: r.name, email: r.email, role: r.role, studyRole: r.studyRole ?? null })),
    more: rows.length > limit,
  };
}
