/**
 * Issue 13 item 5, sessions that end, through the real route handlers and MariaDB: signing out
 * ends that session only; a password change ends the account's other sessions and re-issues the
 * one that made it; a password reset, deactivation and an admin's "sign out everywhere" end all;
 * reactivating the account does not revive them; a fresh sign-in works again.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb } = await import('@/lib/db/knex');
const { encode, decode } = await import('next-auth/jwt');
const { authOptions } = await import('@/lib/auth/options');
const { authSecret } = await import('@/lib/auth/secret');
const { hashPassword } = await import('@/lib/auth/password');
const { updateAccess } = await import('@/lib/people/update-access');
const { createPasswordReset } = await import('@/lib/people/create-password-reset');
const { completePasswordReset } = await import('@/lib/people/complete-password-reset');
const { sessionVersionOf } = await import('@/lib/db/queries/sessions');
const { createUser, uniqueSuffix } = await import('./helpers/factories');
const meRoute = await import('@/app/api/me/route');
const passwordRoute = await import('@/app/api/account/password/route');
const sessionsRoute = await import('@/app/api/admin/users/[id]/sessions/route');

let adminId: number;
afterAll(closeDb);
beforeAll(async () => {
  adminId = await createUser(db, { role: 'admin' });
});

/** A session of the user as sign-in makes it: a fresh id and the account's current version. */
async function signIn(userId: number) {
  return { sid: `s-${uniqueSuffix()}`, sv: await sessionVersionOf({ id: userId }) };
}

async function meAs(userId: number, session: { sid: string; sv: number }): Promise<number> {
  actAs(userId, session);
  return (await callRoute(meRoute.GET, { url: '/api/me', params: {} })).status;
}

describe('sessions that end', () => {
  it('signing out ends that session only, at once', async () => {
    const id = await createUser(db, { role: 'rater' });
    const [laptop, desktop] = [await signIn(id), await signIn(id)];
    expect(await meAs(id, laptop)).toBe(200);
    await authOptions.events!.signOut!({ token: { uid: id, sid: laptop.sid, sv: laptop.sv }, session: null as never });
    expect(await meAs(id, laptop)).toBe(401);
    expect(await meAs(id, desktop)).toBe(200);
  });

  it('a password change ends the other sessions and re-issues the one that made it', async () => {
    const id = await createUser(db, { role: 'rater' });
    await db('users')
      .where({ id })
      .update({ password_hash: await hashPassword('old-password-123') });
    const [here, elsewhere] = [await signIn(id), await signIn(id)];
    const cookie = await encode({ token: { uid: id, sid: here.sid, sv: here.sv }, secret: authSecret() });
    actAs(id, here);
    const req = new Request('http://localhost/api/account/password', {
      method: 'POST',
      headers: { 'content-type': 'application/json', cookie: `next-auth.session-token=${cookie}` },
      body: JSON.stringify({ currentPassword: 'old-password-123', newPassword: 'new-password-456', confirmPassword: 'new-password-456' }),
    });
    const res = await passwordRoute.POST(req, { params: Promise.resolve({}) });
    expect(res.status, await res.clone().text()).toBe(200);
    const setCookie = res.headers.get('set-cookie') ?? '';
    expect(setCookie).toMatch(/^next-auth\.session-token=[^;]+; Path=\/; HttpOnly; SameSite=Lax; Max-Age=43200$/);
    const reissued = await decode({ token: setCookie.split(';')[0].split('=')[1], secret: authSecret() });
    expect(reissued).toMatchObject({ uid: id, sid: here.sid, sv: here.sv + 1 });

    expect(await meAs(id, elsewhere)).toBe(401);
    expect(await meAs(id, here)).toBe(401); // the old token of this session is no longer good …
    expect(await meAs(id, { sid: here.sid, sv: reissued!.sv as number })).toBe(200); // … the re-issued one is
  });

  it('a password reset ends every session', async () => {
    const id = await createUser(db, { role: 'lead' });
    const email = (await db('users').where({ id }).first('email')).email;
    const session = await signIn(id);
    expect(await meAs(id, session)).toBe(200);
    const { token } = await createPasswordReset({ userId: id, email });
    await completePasswordReset({ token, passwordHash: await hashPassword('reset-password-789') });
    expect(await meAs(id, session)).toBe(401);
    expect(await meAs(id, await signIn(id))).toBe(200);
  });

  it('deactivation ends every session and reactivation does not revive them', async () => {
    const id = await createUser(db, { role: 'rater' });
    const session = await signIn(id);
    expect(await meAs(id, session)).toBe(200);
    await updateAccess({ actorId: adminId, userId: id, active: false });
    expect(await meAs(id, session)).toBe(401);
    await updateAccess({ actorId: adminId, userId: id, active: true });
    expect(await meAs(id, session)).toBe(401);
    expect(await meAs(id, await signIn(id))).toBe(200);
  });

  it("an admin's sign-out everywhere ends every session of that person and is audited", async () => {
    const id = await createUser(db, { role: 'observer' });
    const sessions = [await signIn(id), await signIn(id)];
    for (const s of sessions) expect(await meAs(id, s)).toBe(200);
    actAs(id, sessions[0]);
    const refused = await callRoute(sessionsRoute.DELETE, {
      method: 'DELETE',
      url: `/api/admin/users/${adminId}/sessions`,
      params: { id: String(adminId) },
    });
    expect(refused.status).toBe(403);
    actAs(adminId, await signIn(adminId));
    const ok = await callRoute(sessionsRoute.DELETE, {
      method: 'DELETE',
      url: `/api/admin/users/${id}/sessions`,
      params: { id: String(id) },
    });
    expect(ok.status).toBe(200);
    for (const s of sessions) expect(await meAs(id, s)).toBe(401);
    const audit = await db('audit_log')
      .where({ action: 'user.signed_out_everywhere', target_id: String(id) })
      .first('actor_id');
    expect(audit?.actor_id).toBe(adminId);
    actAs(adminId, await signIn(adminId));
    const missing = await callRoute(sessionsRoute.DELETE, {
      method: 'DELETE',
      url: '/api/admin/users/99999999/sessions',
      params: { id: '99999999' },
    });
    expect(missing.status).toBe(404);
  });

  it('a token from before session versions (no id, no version) is not a session', async () => {
    const id = await createUser(db, { role: 'rater' });
    actAs(id, { sid: '', sv: 0 });
    expect((await callRoute(meRoute.GET, { url: '/api/me', params: {} })).status).toBe(401);
  });
});
