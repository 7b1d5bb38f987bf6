/**
 * Blinding in the desk's payloads (real MariaDB, real route handlers): until a rater submits, the
 * components and votes payloads carry nothing of another rater's vote; after submission the other
 * votes appear only when the study shows them (show_votes_after_submit).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-blinding-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb } = await import('@/lib/db/knex');
const { seedDemo } = await import('@/db/seeds/demo');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const componentsRoute = await import('@/app/api/runs/[id]/components/route');
const votesRoute = await import('@/app/api/runs/[id]/votes/route');
const voteRoute = await import('@/app/api/runs/[id]/votes/[componentId]/route');
const submitRoute = await import('@/app/api/runs/[id]/submit/route');

let users: Record<string, number>;
let studyId: number;
let run: Awaited<ReturnType<typeof createReadyRun>>;
const A = () => users['rater1@fernhollow.example'];
const B = () => users['rater2@fernhollow.example'];

const p = () => ({ id: String(run.runId) });
const getVotes = () => callRoute(votesRoute.GET, { url: `/api/runs/${run.runId}/votes`, params: p() });
const getComponents = () => callRoute(componentsRoute.GET, { url: `/api/runs/${run.runId}/components`, params: p() });

function keysIn(value: unknown, out = new Set<string>()): Set<string> {
  if (Array.isArray(value)) value.forEach((v) => keysIn(v, out));
  else if (value && typeof value === 'object') for (const [k, v] of Object.entries(value)) {
      out.add(k);
      keysIn(v, out);
    }
  return out;
}

beforeAll(async () => {
  const seeded = await seedDemo(db);
  users = seeded.users;
  studyId = seeded.studyId;
  run = await createReadyRun(db, { studyId, createdBy: users['lead@fernhollow.example'], raterIds: [A(), B()], size: 'tiny', seed: 5, sub: 'bl' });
  actAs(A());
  for (const id of run.componentIds) await callRoute(voteRoute.PUT, { method: 'PUT', url: '/', params: { id: String(run.runId), componentId: String(id) }, body: { label: 'noise', noiseKind: 'csf', baseVersion: 0 } });
  await callRoute(submitRoute.POST, { method: 'POST', url: '/', params: p() });
});

afterAll(async () => {
  await db('studies').where({ id: studyId }).update({ show_votes_after_submit: true });
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('blinding', () => {
  it('the components payload never carries votes, decisions or tallies', async () => {
    actAs(B());
    const res = await getComponents();
    expect(res.status).toBe(200);
    expect(res.json.components).toHaveLength(run.k);
    const keys = keysIn(res.json);
    for (const k of ['votes', 'vote', 'label', 'decision', 'method', 'others', 'raterName', 'tally']) expect(keys.has(k), k).toBe(false);
  });

  it("before B submits, B's votes payload has only B's own votes and no others", async () => {
    actAs(B());
    const res = await getVotes();
    expect(res.json).toEqual({ status: { submittedAt: null, released: false, othersHidden: 'not_submitted' }, mine: [], others: null });
    expect(JSON.stringify(res.json)).not.toContain('csf');
  });

  it('after submission A sees B only when the study shows votes after submission', async () => {
    actAs(B());
    await callRoute(voteRoute.PUT, { method: 'PUT', url: '/', params: { id: String(run.runId), componentId: String(run.componentIds[0]) }, body: { label: 'signal', baseVersion: 0 } });
    actAs(A());
    let res = await getVotes();
    expect(res.json.status.othersHidden).toBeNull();
    expect(res.json.others).toEqual([{ componentId: run.componentIds[0], raterName: 'Jonah Adeyemi', label: 'signal', noiseKind: null, confidence: null, note: null }]);
    await db('studies').where({ id: studyId }).update({ show_votes_after_submit: false });
    res = await getVotes();
    expect(res.json.others).toBeNull();
    expect(res.json.status.othersHidden).toBe('study_hides');
  });
});
