/**
 * Personal access tokens and their audit entries are written together (lib/tokens/issue-token.ts,
 * revoke-token.ts): when the audit entry cannot be written, no token exists and none is revoked. The
 * fault is a real one inside MariaDB: a trigger that refuses this test's audit rows (SIGNAL SQLSTATE
 * '45000', MariaDB Knowledge Base, "SIGNAL").
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb } = await import('@/lib/db/knex');
const { createUser } = await import('./helpers/factories');
const tokensRoute = await import('@/app/api/account/tokens/route');
const tokenRoute = await import('@/app/api/account/tokens/[tokenId]/route');

const TRIGGER = 'tokens_audit_test_refuses';
let userId: number;

beforeAll(async () => {
  userId = await createUser(db, { role: 'lead' });
});
afterAll(async () => {
  await db.raw(`DROP TRIGGER IF EXISTS ${TRIGGER}`);
  await closeDb();
});

/** Installs the trigger refusing this user's token audit rows (on) or one that lets them through (off). */
async function refuseAudit(on: boolean) {
  await db.raw(`DROP TRIGGER IF EXISTS ${TRIGGER}`);
  await db.raw(
    `CREATE TRIGGER ${TRIGGER} BEFORE INSERT ON audit_log FOR EACH ROW ` +
      `IF ${on ? 1 : 0} = 1 AND NEW.actor_id = ${Number(userId)} AND NEW.action IN ('token.create', 'token.revoke') THEN ` +
      `SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'audit refused by the test'; END IF`,
  );
}

const tokens = () => db('personal_access_tokens').where({ user_id: userId }).select('id', 'name', 'revoked_at as revokedAt');
const audits = (action: string) => db('audit_log').where({ actor_id: userId, action }).select('target_id as targetId');

describe('personal access tokens and their audit entries', () => {
  it('issued: the token and its audit entry; when the audit entry fails, no token and no 2xx', async () => {
    vi.spyOn(console, 'error').mockImplementation(() => {});
    actAs(userId);
    const ok = await callRoute(tokensRoute.POST, {
      method: 'POST',
      url: '/api/account/tokens',
      params: {},
      body: { name: 'Nightly pipeline' },
    });
    expect(ok.status).toBe(201);
    expect((await audits('token.create')).map((a) => Number(a.targetId))).toEqual([ok.json.id]);

    await refuseAudit(true);
    const refused = await callRoute(tokensRoute.POST, {
      method: 'POST',
      url: '/api/account/tokens',
      params: {},
      body: { name: 'Audit will fail' },
    });
    expect(refused.status).toBe(500);
    expect(JSON.stringify(refused.json)).not.toMatch(/audit refused|SQL|trigger/i);
    expect((await tokens()).map((t) => t.name)).toEqual(['Nightly pipeline']);
    await refuseAudit(false);
  });

  it('revoked: when the audit entry fails, the token stays live', async () => {
    vi.spyOn(console, 'error').mockImplementation(() => {});
    actAs(userId);
    const [{ id }] = await tokens();
    await refuseAudit(true);
    const refused = await callRoute(tokenRoute.DELETE, {
      method: 'DELETE',
      url: `/api/account/tokens/${id}`,
      params: { tokenId: String(id) },
    });
    expect(refused.status).toBe(500);
    expect((await tokens()).find((t) => t.id === id)!.revokedAt).toBeNull();
    await refuseAudit(false);
    const ok = await callRoute(tokenRoute.DELETE, { method: 'DELETE', url: `/api/account/tokens/${id}`, params: { tokenId: String(id) } });
    expect(ok.status).toBe(200);
    expect((await tokens()).find((t) => t.id === id)!.revokedAt).not.toBeNull();
    expect((await audits('token.revoke')).map((a) => Number(a.targetId))).toEqual([id]);
  });
});
