import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';
import type { Role, StudyRole } from '@/lib/vocabulary/roles';

/** A stored link as the pages and handlers need it (never the hash). */
export type LinkRecord = {
  id: number;
  kind: 'invite' | 'reset';
  email: string;
  role: Role | null;
  studyId: number | null;
  studyName: string | null;
  studyRole: StudyRole | null;
  userId: number | null;
  userName: string | null;
  invitedBy: number | null;
  inviterName: string | null;
  expiresAt: Date;
  usedAt: Date | null;
  revokedAt: Date | null;
  createdAt: Date;
};

const linkColumns = [
  'i.id',
  'i.kind',
  'i.email',
  'i.role',
  'i.study_id as studyId',
  's.name as studyName',
  'i.study_role as studyRole',
  'i.user_id as userId',
  'u.name as userName',
  'i.invited_by as invitedBy',
  'inv.name as inviterName',
  'i.expires_at as expiresAt',
  'i.used_at as usedAt',
  'i.revoked_at as revokedAt',
  'i.created_at as createdAt',
] as const;

function links(conn: Knex | Knex.Transaction = db) {
  return conn('invitations as i')
    .leftJoin('studies as s', 's.id', 'i.study_id')
    .leftJoin('users as u', 'u.id', 'i.user_id')
    .leftJoin('users as inv', 'inv.id', 'i.invited_by')
    .select(linkColumns);
}

/** The unused, unexpired invitation to an address, if any (the newest), with what it offers and who sent it. */
export async function findPendingInvitation({ email, now = new Date() }: { email: string; now?: Date }): Promise<LinkRecord | null> {
  const row = await links()
    .where({ 'i.kind': 'invite', 'i.email': email })
    .whereNull('i.used_at')
    .whereNull('i.revoked_at')
    .where('i.expires_at', '>', now)
    .orderBy('i.id', 'desc')
    .first();
  return (row as LinkRecord | undefined) ?? null;
}

/** The unused, unrevoked invitations to an address, locked for the caller's transaction. */
export async function lockUnusedInvitations(
  trx: Knex.Transaction,
  { email }: { email: string },
): Promise<{ id: number; role: Role | null; study_id: number | null; study_role: StudyRole | null }[]> {
  return trx('invitations')
    .where({ email, kind: 'invite' })
    .whereNull('used_at')
    .whereNull('revoked_at')
    .forUpdate()
    .select('id', 'role', 'study_id', 'study_role');
}

/** Marks links withdrawn. */
export async function markLinksRevoked(trx: Knex.Transaction, { ids, now }: { ids: number[]; now: Date }): Promise<void> {
  await trx('invitations').whereIn('id', ids).update({ revoked_at: now });
}

/** Writes an invitation link (the token's hash only); returns its id. */
export async function insertInvitation(
  trx: Knex.Transaction,
  {
    tokenHash,
    email,
    role,
    studyId,
    studyRole,
    invitedBy,
    expiresAt,
    now,
  }: {
    tokenHash: string;
    email: string;
    role: Role;
    studyId: number | null;
    studyRole: StudyRole | null;
    invitedBy: number;
    expiresAt: Date;
    now: Date;
  },
): Promise<number> {
  const [inserted] = await trx('invitations').insert({
    kind: 'invite',
    token_hash: tokenHash,
    email,
    role,
    study_id: studyId,
    study_role: studyId ? studyRole : null,
    invited_by: invitedBy,
    expires_at: expiresAt,
    created_at: now,
  });
  return Number(inserted);
}

/** Withdraws a user's unused reset links. */
export async function revokeUnusedResets(trx: Knex.Transaction, { userId, now }: { userId: number; now: Date }): Promise<void> {
  await trx('invitations')
    .where({ user_id: userId, kind: 'reset' })
    .whereNull('used_at')
    .whereNull('revoked_at')
    .update({ revoked_at: now });
}

/** Writes a password-reset link (the token's hash only); returns its id. */
export async function insertPasswordReset(
  trx: Knex.Transaction,
  { tokenHash, email, userId, expiresAt, now }: { tokenHash: string; email: string; userId: number; expiresAt: Date; now: Date },
): Promise<number> {
  const [inserted] = await trx('invitations').insert({
    kind: 'reset',
    token_hash: tokenHash,
    email,
    user_id: userId,
    expires_at: expiresAt,
    created_at: now,
  });
  return Number(inserted);
}

/** The link with a token's hash (any state), or null when no such token was issued. */
export async function findLinkByTokenHash({
  tokenHash,
  kind,
}: {
  tokenHash: string;
  kind: 'invite' | 'reset';
}): Promise<LinkRecord | null> {
  const row = await links().where({ 'i.token_hash': tokenHash, 'i.kind': kind }).first();
  return (row as LinkRecord | undefined) ?? null;
}

/** The link with a token's hash, its row locked for the caller's transaction; null when there is none. */
export async function lockLinkByTokenHash(
  trx: Knex.Transaction,
  { tokenHash, kind }: { tokenHash: string; kind: 'invite' | 'reset' },
): Promise<LinkRecord | null> {
  const locked = await trx('invitations').where({ token_hash: tokenHash, kind }).forUpdate().first('id');
  return locked ? ((await links(trx).where('i.id', locked.id).first()) as LinkRecord) : null;
}

/** Whether an account has this e-mail (inside the caller's transaction). */
export async function accountWithEmailExists(trx: Knex.Transaction, { email }: { email: string }): Promise<boolean> {
  return Boolean(await trx('users').where({ email }).first('id'));
}

/** Creates the invited account (with the invitation's role) and its study membership when the invitation names one; returns its id. */
export async function insertInvitedAccount(
  trx: Knex.Transaction,
  { link, name, passwordHash }: { link: LinkRecord; name: string; passwordHash: string },
): Promise<number> {
  const [userId] = await trx('users').insert({
    email: link.email,
    name,
    password_hash: passwordHash,
    role: link.role ?? 'rater',
    active: true,
  });
  if (link.studyId && link.studyRole) {
    await trx('study_members').insert({ study_id: link.studyId, user_id: userId, study_role: link.studyRole, added_by: link.invitedBy });
  }
  return Number(userId);
}

/** Marks a link used (by the account it created or reset). */
export async function markLinkUsed(trx: Knex.Transaction, { id, now, userId }: { id: number; now: Date; userId?: number }): Promise<void> {
  await trx('invitations')
    .where({ id })
    .update(userId === undefined ? { used_at: now } : { used_at: now, user_id: userId });
}

/** An account's id and active flag (inside the caller's transaction). */
export async function findAccountState(
  trx: Knex.Transaction,
  { userId }: { userId: number | null },
): Promise<{ id: number; active: boolean } | undefined> {
  return trx('users').where({ id: userId }).first('id', 'active');
}

/** Sets a new password hash and raises the session version (every session of the account ends). */
export async function writePasswordEndingSessions(
  trx: Knex.Transaction,
  { userId, passwordHash, now }: { userId: number; passwordHash: string; now: Date },
): Promise<void> {
  await trx('users')
    .where({ id: userId })
    .update({ password_hash: passwordHash, session_version: trx.raw('session_version + 1'), updated_at: now });
}

/** Invitations for the facility page, newest first (all, or only those one person sent). */
export async function listInvitationLinks({ invitedBy, limit = 200 }: { invitedBy?: number; limit?: number } = {}): Promise<LinkRecord[]> {
  const q = links().where('i.kind', 'invite').orderBy('i.created_at', 'desc').limit(limit);
  if (invitedBy) q.where('i.invited_by', invitedBy);
  return (await q) as LinkRecord[];
}

/** An unused invitation, its row locked; undefined when there is none to withdraw. */
export async function lockUnusedInvitation(
  trx: Knex.Transaction,
  { id }: { id: number },
): Promise<{ id: number; email: string; study_id: number | null } | undefined> {
  return trx('invitations')
    .where({ id, kind: 'invite' })
    .whereNull('used_at')
    .whereNull('revoked_at')
    .forUpdate()
    .first('id', 'email', 'study_id');
}

/** A study's name (null when there is no such study). */
export async function findStudyName({ studyId }: { studyId: number }): Promise<string | null> {
  const row = await db('studies').where({ id: studyId }).first('name');
  return row ? String(row.name) : null;
}

/** Who sent an invitation (undefined when there is no invitation with that id). */
export async function findInvitationSender({ id }: { id: number }): Promise<{ invitedBy: number | null } | undefined> {
  return db('invitations').where({ id, kind: 'invite' }).first('invited_by as invitedBy');
}
