/**
 * Issue 13 item 9, the demo start is not a deployment: re-seeding the demo keeps an admin's
 * changes; /api/health answers 503 with a reason while the secret or the database is missing and
 * 200 when both are there; the production start (scripts/serve.ts) refuses to start without a
 * real secret or with the demo's mailbox, before it touches anything.
 */
import { execFile } from 'node:child_process';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it, vi } from 'vitest';

vi.mock('server-only', () => ({}));

const { db, closeDb, createDb } = await import('@/lib/db/knex');
const { resolveDbSettings } = await import('@/lib/db/config');
const { seedDemo, DEMO_PASSWORD } = await import('@/db/seeds/demo');
const { hashPassword, verifyPassword } = await import('@/lib/auth/password');
const { readiness } = await import('@/lib/health');
const healthRoute = await import('@/app/api/health/route');

const root = path.resolve(import.meta.dirname, '../..');
const run = promisify(execFile);

afterAll(closeDb);

describe('demo seed on restart', () => {
  it('keeps a deactivated account deactivated, a changed role, a changed password and a removed membership', async () => {
    const first = await seedDemo(db);
    const rater4 = first.users['rater4@fernhollow.example'];
    const observer = first.users['observer@fernhollow.example'];
    const before = await db('users').whereIn('id', [rater4, observer]).select('id', 'role', 'active', 'password_hash');
    const membership = await db('study_members').where({ study_id: first.studyId, user_id: rater4 }).first();
    try {
      await db('users').where({ id: rater4 }).update({ active: false, role: 'observer' });
      await db('users')
        .where({ id: observer })
        .update({ password_hash: await hashPassword('the-admin-changed-it') });
      await db('study_members').where({ study_id: first.studyId, user_id: rater4 }).delete();

      const second = await seedDemo(db);
      expect(second.users).toEqual(first.users);
      expect(await db('users').where({ id: rater4 }).first('role', 'active')).toEqual({ role: 'observer', active: false });
      const hash = (await db('users').where({ id: observer }).first('password_hash')).password_hash;
      expect(await verifyPassword('the-admin-changed-it', hash)).toBe(true);
      expect(await verifyPassword(DEMO_PASSWORD, hash)).toBe(false);
      expect(await db('study_members').where({ study_id: first.studyId, user_id: rater4 }).first()).toBeUndefined();
    } finally {
      for (const row of before)
        await db('users').where({ id: row.id }).update({ role: row.role, active: row.active, password_hash: row.password_hash });
      if (membership && !(await db('study_members').where({ study_id: first.studyId, user_id: rater4 }).first()))
        await db('study_members').insert(membership);
    }
  });
});

describe('/api/health', () => {
  const saved = { NODE_ENV: process.env.NODE_ENV, NEXTAUTH_SECRET: process.env.NEXTAUTH_SECRET };
  const restore = () => {
    for (const [k, v] of Object.entries(saved)) {
      if (v === undefined) delete process.env[k];
      else process.env[k] = v;
    }
  };
  const get = () => healthRoute.GET(new Request('http://localhost/api/health'), { params: Promise.resolve({}) });

  it('answers 503 with the reason when a production server has no real secret, 200 when it has one', async () => {
    try {
      Object.assign(process.env, { NODE_ENV: 'production' });
      delete process.env.NEXTAUTH_SECRET;
      const missing = await get();
      expect(missing.status).toBe(503);
      expect(await missing.json()).toMatchObject({
        ready: false,
        secret: 'missing or weak',
        database: 'reachable',
        reasons: [expect.stringMatching(/NEXTAUTH_SECRET/)],
      });
      process.env.NEXTAUTH_SECRET = 'e2b7c0d94f1a46b38c5e7d2f9a0b1c3d';
      const ok = await get();
      expect(ok.status).toBe(200);
      expect(await ok.json()).toEqual({ ready: true, secret: 'ok', database: 'reachable', reasons: [] });
    } finally {
      restore();
    }
  });

  it('reports the database unreachable without naming its address', async () => {
    const gone = createDb({ ...resolveDbSettings(), host: '127.0.0.1', port: 1 });
    const spy = vi.spyOn(console, 'error').mockImplementation(() => undefined);
    try {
      const state = await readiness({ env: { NODE_ENV: 'production', NEXTAUTH_SECRET: 'e2b7c0d94f1a46b38c5e7d2f9a0b1c3d' }, conn: gone });
      expect(state).toMatchObject({ ready: false, secret: 'ok', database: 'unreachable' });
      expect(state.reasons.join(' ')).toMatch(/database is not reachable/);
      expect(JSON.stringify(state)).not.toMatch(/127\.0\.0\.1|ECONNREFUSED|:1\b/);
    } finally {
      spy.mockRestore();
      await gone.destroy();
    }
  });
});

describe('npm start (scripts/serve.ts)', () => {
  const start = (env: Record<string, string>) =>
    run('node', ['--import', 'tsx', 'scripts/serve.ts'], {
      cwd: root,
      env: {
        PATH: process.env.PATH ?? '',
        HOME: process.env.HOME ?? '',
        QUORUM_NEXT_DIST: '.no-build-here',
        NODE_ENV: 'production',
        ...env,
      },
      timeout: 60_000,
    }).then(
      () => ({ code: 0, stderr: '' }),
      (err: { code: number; stderr: string }) => ({ code: err.code, stderr: err.stderr }),
    );

  it('refuses to start without a real secret, naming what to do', async () => {
    const res = await start({});
    expect(res.code).toBe(2);
    expect(res.stderr).toMatch(/not starting:[\s\S]*NEXTAUTH_SECRET is not set[\s\S]*openssl rand -hex 32/);
    const weak = await start({ NEXTAUTH_SECRET: 'e2e-only-secret-1764700000' });
    expect(weak.code).toBe(2);
    expect(weak.stderr).toMatch(/26 characters long/);
  });

  it('refuses the demo mailbox, and says to build first when there is no build', async () => {
    const secret = 'c4d1e8f2a7b9403e96d5a0f1b2c3d4e5';
    const mailbox = await start({ NEXTAUTH_SECRET: secret, QUORUM_DEV_MAILBOX: '1' });
    expect(mailbox.code).toBe(2);
    expect(mailbox.stderr).toMatch(/QUORUM_DEV_MAILBOX=1/);
    const nobuild = await start({ NEXTAUTH_SECRET: secret });
    expect(nobuild.code).toBe(2);
    expect(nobuild.stderr).toMatch(/no production build in \.no-build-here\/ — run `npm run build` first/);
  });
});
