/**
 * Issue 13 item 10, odd inputs answer 4xx with a clear message, never 500: a lone UTF-16 surrogate
 * in a vote's note, a decision's reason or a release's notes; an over-long e-mail; an over-long
 * X-Forwarded-For behind a trusted proxy. Through the real route handlers and MariaDB.
 */
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-odd-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb } = await import('@/lib/db/knex');
const { seedDemo } = await import('@/db/seeds/demo');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const voteRoute = await import('@/app/api/runs/[id]/votes/[componentId]/route');
const resetRoute = await import('@/app/api/password-reset/route');
const releasesRoute = await import('@/app/api/studies/[id]/releases/route');

let run: Awaited<ReturnType<typeof createReadyRun>>;
let users: Record<string, number>;
let studyId: number;
const LONE = 'rim artefact \ud83d then text'; // the first half of an emoji, alone

beforeAll(async () => {
  const seeded = await seedDemo(db);
  users = seeded.users;
  studyId = seeded.studyId;
  run = await createReadyRun(db, {
    studyId,
    createdBy: users['lead@fernhollow.example'],
    raterIds: [users['rater1@fernhollow.example']],
    size: 'tiny',
    seed: 21,
    sub: 'odd',
  });
});
afterAll(async () => {
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('odd inputs', () => {
  it('a lone surrogate in a note is refused with 422 naming the note; a whole emoji is kept', async () => {
    actAs(users['rater1@fernhollow.example']);
    const put = (note: string, baseVersion: number) =>
      callRoute(voteRoute.PUT, {
        method: 'PUT',
        url: `/api/runs/${run.runId}/votes/${run.componentIds[0]}`,
        params: { id: String(run.runId), componentId: String(run.componentIds[0]) },
        body: { label: 'noise', noiseKind: 'motion', baseVersion, note },
      });
    const bad = await put(LONE, 0);
    expect(bad.status).toBe(422);
    expect(bad.json.error.message).toMatch(/note.*broken character/);
    const good = await put('rim artefact \ud83d\ude00 ok', 0);
    expect(good.status, JSON.stringify(good.json)).toBe(200);
  });

  it('a lone surrogate in release notes is refused with 422', async () => {
    actAs(users['lead@fernhollow.example']);
    const res = await callRoute(releasesRoute.POST, {
      method: 'POST',
      url: `/api/studies/${studyId}/releases`,
      params: { id: String(studyId) },
      body: { notes: LONE },
    });
    expect(res.status).toBe(422);
    expect(res.json.error.message).toMatch(/broken character/);
  });

  it('an over-long e-mail is refused with 422 before any SQL', async () => {
    actAs(null);
    const res = await callRoute(resetRoute.POST, {
      method: 'POST',
      url: '/api/password-reset',
      params: {},
      body: { email: `${'a'.repeat(300)}@example.org` },
    });
    expect(res.status).toBe(422);
    expect(res.json.error.message).toMatch(/at most 254 characters/);
  });

  it('an over-long X-Forwarded-For behind a trusted proxy is no address: the vote is kept, audited without one', async () => {
    const saved = process.env.QUORUM_TRUST_PROXY;
    process.env.QUORUM_TRUST_PROXY = '1';
    try {
      actAs(users['rater1@fernhollow.example']);
      for (const [i, forwarded] of [`${'2'.repeat(60)}, 10.0.0.1`, '3'.repeat(8000)].entries()) {
        const componentId = run.componentIds[1 + i];
        const res = await callRoute(voteRoute.PUT, {
          method: 'PUT',
          url: `/api/runs/${run.runId}/votes/${componentId}`,
          params: { id: String(run.runId), componentId: String(componentId) },
          body: { label: 'signal', baseVersion: 0 },
          headers: { 'x-forwarded-for': forwarded },
        });
        expect(res.status, JSON.stringify(res.json)).toBe(200);
      }
      const audits = await db('audit_log')
        .where({ action: 'vote.cast', target_type: 'component' })
        .whereIn('target_id', run.componentIds.slice(1, 3).map(String))
        .select('ip');
      expect(audits).toEqual([{ ip: null }, { ip: null }]);
    } finally {
      if (saved === undefined) delete process.env.QUORUM_TRUST_PROXY;
      else process.env.QUORUM_TRUST_PROXY = saved;
    }
  });
});
