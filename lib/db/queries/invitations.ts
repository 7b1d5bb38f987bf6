import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';
import { recordAudit } from '@/lib/db/queries/audit';
import { hashToken, inviteTtlMs, linkRefusal, linkState, newToken, RESET_TTL_MS, type LinkState } from '@/lib/auth/tokens';
import type { Role } from '@/lib/auth/roles';
import { AppError } from '@/lib/errors';
import type { StudyRole } from '@/lib/studies/labels';



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
  const id = await db.transaction(async (trx) => {
    const earlier = await trx('invitations').where({ email, kind: 'invite' }).whereNull('used_at').whereNull('revoked_at').forUpdate().select('id', 'role', 'study_id', 'study_role');
    if (earlier.length) await trx('invitations').whereIn('id', earlier.map((e) => e.id)).update({ revoked_at: now });
    const [inserted] = await trx('invitations').insert({
      kind: 'invite',
      token_hash: hash,
      email,
      role,
      study_id: studyId,
      study_role: studyId ? studyRole : null,
      invited_by: invitedBy,
      expires_at: expiresAt,
      created_at: now,
    });
    await recordAudit(
      { actorId: invitedBy, action: 'invitation.sent', targetType: 'invitation', targetId: inserted, studyId, detail: { email, role, studyRole } },
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
          detail: { email, reason: 'replaced', replacedBy: Number(inserted), role: e.role, studyRole: e.study_role ?? null },
        },
        trx,
      );
    }
    return Number(inserted);
  });
  return { id, token, expiresAt };
}

/** Writes a password-reset link for a user (one hour) and withdraws their earlier unused ones. */
export async function createPasswordReset({
  userId,
  email,
  ip = null,
  ttlMs = RESET_TTL_MS,
  now = new Date(),
}: {
  userId: number;
  email: string;
  ip?: string | null;
  ttlMs?: number;
  now?: Date;
}): Promise<{ id: number; token: string; expiresAt: Date }> {
  const { token, hash } = newToken();
  const expiresAt = new Date(now.getTime() + ttlMs);
  const id = await db.transaction(async (trx) => {
    await trx('invitations').where({ user_id: userId, kind: 'reset' }).whereNull('used_at').whereNull('revoked_at').update({ revoked_at: now });
    const [inserted] = await trx('invitations').insert({
      kind: 'reset',
      token_hash: hash,
      email,
      user_id: userId,
      expires_at: expiresAt,
      created_at: now,
    });
    await recordAudit({ actorId: null, action: 'password_reset.requested', targetType: 'user', targetId: userId, ip }, trx);
    return Number(inserted);
  });
  return { id, token, expiresAt };
}

/** The link for a token (any state), or null when no such token was issued. */
export async function findLinkByToken({ token, kind }: { token: string; kind: 'invite' | 'reset' }): Promise<LinkRecord | null> {
  const row = await links().where({ 'i.token_hash': hashToken(token), 'i.kind': kind }).first();
  return (row as LinkRecord | undefined) ?? null;
}

/** The state of the link and, when it cannot be used, the message to show. */
export function describeLink(link: LinkRecord | null, kind: 'invite' | 'reset', now = new Date()): { state: LinkState; message: string | null } {
  const state = linkState(link, now);
  if (state === 'valid') return { state, message: null };
  return {
    state,
    message: linkRefusal({ state, kind, expiresAt: link?.expiresAt, askWhom: link?.inviterName ?? undefined }),
  };
}

/** Locks the link row of a token inside a transaction and refuses a link that cannot be used (409 with the message). */
async function claimLink(trx: Knex.Transaction, token: string, kind: 'invite' | 'reset', now: Date): Promise<LinkRecord> {
  const locked = await trx('invitations').where({ token_hash: hashToken(token), kind }).forUpdate().first('id');
  const link = locked ? ((await links(trx).where('i.id', locked.id).first()) as LinkRecord) : null;
  const { state, message } = describeLink(link, kind, now);
  if (state === 'unknown') throw new AppError('not_found', message!);
  if (state !== 'valid') throw new AppError('conflict', message!);
  return link!;
}

/**
 * Accepts an invitation: creates the account with the invited role (and study membership),
 * marks the link used — all in one transaction, so a link works exactly once.
 */
export async function acceptInvitation({
  token,
  name,
  passwordHash,
  ip = null,
  now = new Date(),
}: {
  token: string;
  name: string;
  passwordHash: string;
  ip?: string | null;
  now?: Date;
}): Promise<{ userId: number; email: string }> {
  return db.transaction(async (trx) => {
    const link = await claimLink(trx, token, 'invite', now);
    const existing = await trx('users').where({ email: link.email }).first('id');
    if (existing) {
      throw new AppError('conflict', 'An account already exists for this address. Sign in, or use “Forgot your password?”.');
    }
    const [userId] = await trx('users').insert({ email: link.email, name, password_hash: passwordHash, role: link.role ?? 'rater', active: true });
    if (link.studyId && link.studyRole) {
      await trx('study_members').insert({ study_id: link.studyId, user_id: userId, study_role: link.studyRole, added_by: link.invitedBy });
    }
    await trx('invitations').where({ id: link.id }).update({ used_at: now, user_id: userId });
    await recordAudit(
      { actorId: Number(userId), action: 'invitation.accepted', targetType: 'invitation', targetId: link.id, studyId: link.studyId, detail: { email: link.email, role: link.role }, ip },
      trx,
    );
    return { userId: Number(userId), email: link.email };
  });
}

/** Sets a new password through a reset link and marks the link used (one transaction). */
export async function completePasswordReset({
  token,
  passwordHash,
  ip = null,
  now = new Date(),
}: {
  token: string;
  passwordHash: string;
  ip?: string | null;
  now?: Date;
}): Promise<{ userId: number }> {
  return db.transaction(async (trx) => {
    const link = await claimLink(trx, token, 'reset', now);
    const user = await trx('users').where({ id: link.userId }).first('id', 'active');
    if (!user || !user.active) throw new AppError('conflict', 'This account is deactivated. Ask the facility admin.');
    // a reset ends every session of the account (whoever knew the old password is signed out)
    await trx('users').where({ id: user.id }).update({ password_hash: passwordHash, session_version: trx.raw('session_version + 1'), updated_at: now });
    await trx('invitations').where({ id: link.id }).update({ used_at: now });
    await recordAudit({ actorId: Number(user.id), action: 'password_reset.completed', targetType: 'user', targetId: user.id, ip }, trx);
    return { userId: Number(user.id) };
  });
}

export type InvitationListItem = LinkRecord & { state: LinkState };

/** Invitations for the facility page, newest first (admins see all; others only their own). */
export async function listInvitations({ invitedBy, limit = 200 }: { invitedBy?: number; limit?: number } = {}): Promise<InvitationListItem[]> {
  const q = links().where('i.kind', 'invite').orderBy('i.created_at', 'desc').limit(limit);
  if (invitedBy) q.where('i.invited_by', invitedBy);
  const now = new Date();
  return ((await q) as LinkRecord[]).map((r) => ({ ...r, state: linkState(r, now) }));
}

/** Withdraws an unused invitation. Returns false when there is none to withdraw. */
export async function revokeInvitation({ id, actorId, now = new Date() }: { id: number; actorId: number; now?: Date }): Promise<boolean> {
  return db.transaction(async (trx) => {
    const row = await trx('invitations').where({ id, kind: 'invite' }).whereNull('used_at').whereNull('revoked_at').forUpdate().first('id', 'email', 'study_id');
    if (!row) return false;
    await trx('invitations').where({ id }).update({ revoked_at: now });
    await recordAudit({ actorId, action: 'invitation.revoked', targetType: 'invitation', targetId: id, studyId: row.study_id, detail: { email: row.email } }, trx);
    return true;
  });
}


/** A study's name (null when there is no such study). */
export async function findStudyName({ studyId }: { studyId: number }): Promise<string | null> {
  const row = await db('studies').where({ id: studyId }).first('name');
  return row ? String(row.name) : null;
}
