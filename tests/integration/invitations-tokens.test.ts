/**
 * One-time links against the real MariaDB: only the SHA-256 of a token is stored; invitations
 * and resets expire (7 days / 1 hour), work exactly once (also under concurrent use), are withdrawn
 * by newer ones; the refusal messages say why; the throttle locks a key after repeated failures.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHash, randomBytes } from 'node:crypto';
import { db } from '@/lib/db/knex';
import { AppError } from '@/lib/errors';
import { hashToken, inviteTtlMs, linkState, looksLikeToken, newToken, RESET_TTL_MS } from '@/lib/auth/tokens';
import { hashPassword, verifyPassword } from '@/lib/auth/password';
import { clearFailures, lockedFor, MAX_FAILURES, recordFailure } from '@/lib/auth/throttle';
import { acceptInvitation } from '@/lib/invitations/accept-invitation';
import { createInvitation } from '@/lib/invitations/create-invitation';
import { describeLink, findLinkByToken } from '@/lib/invitations/find-link';
import { revokeInvitation } from '@/lib/invitations/revoke-invitation';
import { completePasswordReset } from '@/lib/people/complete-password-reset';
import { createPasswordReset } from '@/lib/people/create-password-reset';

const tag = randomBytes(3).toString('hex');
const addr = (name: string) => `${name}-${tag}@fernhollow.example`;
let adminId: number;
let studyId: number;
let passwordHash: string;

async function makeUser(email: string, role: 'admin' | 'lead' | 'rater' | 'observer', hash: string | null = null): Promise<number> {
  const [id] = await db('users').insert({ email, name: email.split('@')[0], role, active: true, password_hash: hash });
  return Number(id);
}

async function rejection(p: Promise<unknown>): Promise<AppError> {
  try {
    await p;
  } catch (err) {
    if (err instanceof AppError) return err;
    throw err;
  }
  throw new Error('expected a refusal');
}

beforeAll(async () => {
  passwordHash = await hashPassword('a-long-enough-password');
  adminId = await makeUser(addr('admin'), 'admin');
  const [sid] = await db('studies').insert({
    name: `Token study ${tag}`,
    created_by: adminId,
    label_set: '["signal","noise","uncertain"]',
    noise_kinds: '["motion"]',
  });
  studyId = Number(sid);
});

afterAll(async () => {
  await db.destroy();
});

describe('tokens', () => {
  it('are 32 random bytes in base64url, stored only as their sha256', async () => {
    const { token, hash } = newToken();
    expect(looksLikeToken(token)).toBe(true);
    expect(Buffer.from(token, 'base64url')).toHaveLength(32);
    expect(hash).toBe(createHash('sha256').update(token).digest('hex'));
    expect(hashToken(token)).toBe(hash);
    expect(newToken().token).not.toBe(token);

    const invite = await createInvitation({ email: addr('stored'), role: 'rater', invitedBy: adminId });
    const row = await db('invitations').where({ id: invite.id }).first();
    expect(row.token_hash).toBe(hashToken(invite.token));
    expect(JSON.stringify(row)).not.toContain(invite.token);
  });

  it('has the documented lifetimes', () => {
    expect(inviteTtlMs({})).toBe(7 * 24 * 3600 * 1000);
    expect(inviteTtlMs({ QUORUM_INVITE_DAYS: '2' })).toBe(2 * 24 * 3600 * 1000);
    expect(RESET_TTL_MS).toBe(3600 * 1000);
  });

  it('states: used and withdrawn win over expired', () => {
    const past = new Date(Date.now() - 1000);
    expect(linkState(null)).toBe('unknown');
    expect(linkState({ expiresAt: new Date(Date.now() + 1000), usedAt: null, revokedAt: null })).toBe('valid');
    expect(linkState({ expiresAt: past, usedAt: null, revokedAt: null })).toBe('expired');
    expect(linkState({ expiresAt: past, usedAt: past, revokedAt: null })).toBe('used');
    expect(linkState({ expiresAt: past, usedAt: null, revokedAt: past })).toBe('revoked');
  });
});

describe('invitations', () => {
  it('expire after seven days and create the account with role and study membership once', async () => {
    const email = addr('newrater');
    const before = Date.now();
    const invite = await createInvitation({ email, role: 'rater', studyId, studyRole: 'rater', invitedBy: adminId });
    expect(invite.expiresAt.getTime() - before).toBeGreaterThanOrEqual(7 * 24 * 3600 * 1000 - 5000);
    const link = await findLinkByToken({ token: invite.token, kind: 'invite' });
    expect(describeLink(link, 'invite').state).toBe('valid');
    expect(await findLinkByToken({ token: invite.token, kind: 'reset' })).toBeNull();

    const { userId } = await acceptInvitation({ token: invite.token, name: 'New Rater', passwordHash });
    const user = await db('users').where({ id: userId }).first('email', 'role', 'active', 'password_hash');
    expect(user).toMatchObject({ email, role: 'rater', active: true });
    expect(await verifyPassword('a-long-enough-password', user.password_hash)).toBe(true);
    expect(await db('study_members').where({ user_id: userId, study_id: studyId }).first('study_role')).toEqual({ study_role: 'rater' });

    const again = await rejection(acceptInvitation({ token: invite.token, name: 'Someone else', passwordHash }));
    expect(again.code).toBe('conflict');
    expect(again.message).toMatch(/already been used/);
    const audit = await db('audit_log')
      .where({ action: 'invitation.accepted', target_id: String(invite.id) })
      .first('actor_id');
    expect(audit.actor_id).toBe(userId);
    expect(
      await db('audit_log')
        .where({ action: 'invitation.sent', target_id: String(invite.id) })
        .first('actor_id'),
    ).toEqual({ actor_id: adminId });
  });

  it('refuses an expired link with the date and whom to ask', async () => {
    const invite = await createInvitation({
      email: addr('late'),
      role: 'observer',
      invitedBy: adminId,
      now: new Date(Date.now() - 8 * 24 * 3600 * 1000),
    });
    const link = await findLinkByToken({ token: invite.token, kind: 'invite' });
    const { state, message } = describeLink(link, 'invite');
    expect(state).toBe('expired');
    expect(message).toMatch(/^This link expired on \d{1,2} \w+ \d{4}/);
    expect(message).toContain(`ask admin-${tag}`);
    const err = await rejection(acceptInvitation({ token: invite.token, name: 'Late', passwordHash }));
    expect(err.code).toBe('conflict');
    expect(
      await db('users')
        .where({ email: addr('late') })
        .first('id'),
    ).toBeUndefined();
  });

  it('a newer invitation withdraws the older one; withdrawn links are refused', async () => {
    const email = addr('twice');
    const first = await createInvitation({ email, role: 'rater', invitedBy: adminId });
    const second = await createInvitation({ email, role: 'observer', invitedBy: adminId });
    expect(describeLink(await findLinkByToken({ token: first.token, kind: 'invite' }), 'invite').state).toBe('revoked');
    expect(await revokeInvitation({ id: second.id, actorId: adminId })).toBe(true);
    expect(await revokeInvitation({ id: second.id, actorId: adminId })).toBe(false);
    const err = await rejection(acceptInvitation({ token: second.token, name: 'X', passwordHash }));
    expect(err.message).toMatch(/withdrawn/);
    expect(
      await db('audit_log')
        .where({ action: 'invitation.revoked', target_id: String(second.id) })
        .first('id'),
    ).toBeTruthy();
  });

  it('an unknown token is not found', async () => {
    const err = await rejection(acceptInvitation({ token: newToken().token, name: 'X', passwordHash }));
    expect(err.code).toBe('not_found');
    expect(err.message).toMatch(/not valid/);
  });

  it('works exactly once when two people use the link at the same moment', async () => {
    const invite = await createInvitation({ email: addr('race'), role: 'rater', invitedBy: adminId });
    const results = await Promise.allSettled([
      acceptInvitation({ token: invite.token, name: 'One', passwordHash }),
      acceptInvitation({ token: invite.token, name: 'Two', passwordHash }),
    ]);
    expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
    expect(
      await db('users')
        .where({ email: addr('race') })
        .count({ n: 'id' }),
    ).toEqual([{ n: 1 }]);
  });

  it('refuses when the address got an account in the meantime', async () => {
    const email = addr('taken');
    const invite = await createInvitation({ email, role: 'rater', invitedBy: adminId });
    await makeUser(email, 'rater');
    const err = await rejection(acceptInvitation({ token: invite.token, name: 'X', passwordHash }));
    expect(err.code).toBe('conflict');
    expect(err.message).toMatch(/already exists/);
  });
});

describe('password resets', () => {
  it('expire after one hour, change the password once and are audited', async () => {
    const email = addr('forgetful');
    const userId = await makeUser(email, 'rater', await hashPassword('the-old-password'));
    const reset = await createPasswordReset({ userId, email });
    expect(reset.expiresAt.getTime() - Date.now()).toBeLessThanOrEqual(RESET_TTL_MS);
    expect(reset.expiresAt.getTime() - Date.now()).toBeGreaterThan(RESET_TTL_MS - 5000);

    const newHash = await hashPassword('the-new-password');
    await completePasswordReset({ token: reset.token, passwordHash: newHash });
    const { password_hash } = await db('users').where({ id: userId }).first('password_hash');
    expect(await verifyPassword('the-new-password', password_hash)).toBe(true);
    const again = await rejection(completePasswordReset({ token: reset.token, passwordHash: newHash }));
    expect(again.message).toMatch(/already been used/);
    expect(
      await db('audit_log')
        .where({ action: 'password_reset.requested', target_id: String(userId) })
        .first('id'),
    ).toBeTruthy();
    expect(await db('audit_log').where({ action: 'password_reset.completed', actor_id: userId }).first('id')).toBeTruthy();
  });

  it('refuses a link older than an hour, and a deactivated account', async () => {
    const email = addr('slow');
    const userId = await makeUser(email, 'observer');
    const old = await createPasswordReset({ userId, email, now: new Date(Date.now() - 61 * 60 * 1000) });
    const err = await rejection(completePasswordReset({ token: old.token, passwordHash }));
    expect(err.message).toMatch(/expired on .*Forgot your password/);

    const fresh = await createPasswordReset({ userId, email });
    await db('users').where({ id: userId }).update({ active: false });
    const off = await rejection(completePasswordReset({ token: fresh.token, passwordHash }));
    expect(off.message).toMatch(/deactivated/);
  });

  it('an invitation token is not a reset token', async () => {
    const invite = await createInvitation({ email: addr('mixup'), role: 'rater', invitedBy: adminId });
    const err = await rejection(completePasswordReset({ token: invite.token, passwordHash }));
    expect(err.code).toBe('not_found');
  });
});

describe('throttling of the invitation and reset keys', () => {
  it('locks a key after the allowed failures and frees it when cleared', async () => {
    for (const key of [`invite:link:${tag}`, `reset:email:${addr('x')}`] as const) {
      await clearFailures(key);
      for (let i = 0; i < MAX_FAILURES - 1; i++) await recordFailure(key);
      expect(await lockedFor(key)).toBe(0);
      await recordFailure(key);
      const wait = await lockedFor(key);
      expect(wait).toBeGreaterThan(14 * 60 * 1000);
      await clearFailures(key);
      expect(await lockedFor(key)).toBe(0);
    }
  });
});
