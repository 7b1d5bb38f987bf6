/**
 * Vote rules against the real MariaDB, through the real route handlers, as each role: the desk
 * refuses a vote for another run's component, a label outside the study's set, a run the rater is
 * not assigned to, and any change after release; merges concurrent changes field by field;
 * audits every change; recomputes the decision in the same transaction; submission rules.
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

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-votes-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb } = await import('@/lib/db/knex');
const { seedDemo } = await import('@/db/seeds/demo');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const votesRoute = await import('@/app/api/runs/[id]/votes/route');
const voteRoute = await import('@/app/api/runs/[id]/votes/[componentId]/route');
const submitRoute = await import('@/app/api/runs/[id]/submit/route');
const deskRoute = await import('@/app/api/runs/[id]/desk/route');

let users: Record<string, number>;
let runA: Awaited<ReturnType<typeof createReadyRun>>;
let runB: Awaited<ReturnType<typeof createReadyRun>>;
const r1 = () => users['rater1@fernhollow.example'];
const r2 = () => users['rater2@fernhollow.example'];
const r3 = () => users['rater3@fernhollow.example'];

function put(runId: number, componentId: number, body: unknown) {
  return callRoute(voteRoute.PUT, {
    method: 'PUT',
    url: `/api/runs/${runId}/votes/${componentId}`,
    params: { id: String(runId), componentId: String(componentId) },
    body,
  });
}

beforeAll(async () => {
  const seeded = await seedDemo(db);
  users = seeded.users;
  const lead = users['lead@fernhollow.example'];
  runA = await createReadyRun(db, { studyId: seeded.studyId, createdBy: lead, raterIds: [r1(), r2()], size: 'tiny', seed: 3, sub: 'va' });
  runB = await createReadyRun(db, { studyId: seeded.studyId, createdBy: lead, raterIds: [r3()], size: 'tiny', seed: 4, sub: 'vb' });
});

afterAll(async () => {
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('refusals', () => {
  it('refuses a vote without a session (401) and for roles without votes.write (403)', async () => {
    actAs(null);
    expect((await put(runA.runId, runA.componentIds[0], { label: 'signal', baseVersion: 0 })).status).toBe(401);
    for (const email of ['lead@fernhollow.example', 'observer@fernhollow.example']) {
      actAs(users[email]);
      const res = await put(runA.runId, runA.componentIds[0], { label: 'signal', baseVersion: 0 });
      expect(res.status).toBe(403);
      expect(res.json.error.message).toMatch(/votes\.write/);
    }
  });

  it('refuses a vote on a run the rater is not assigned to, for raters and the admin alike (404)', async () => {
    for (const id of [r3(), users['admin@fernhollow.example']]) {
      actAs(id);
      const res = await put(runA.runId, runA.componentIds[0], { label: 'signal', baseVersion: 0 });
      expect(res.status).toBe(404);
      expect(res.json.error.message).toMatch(/not among the runs assigned to you/);
    }
    actAs(r3());
    const list = await callRoute(votesRoute.GET, { url: `/api/runs/${runA.runId}/votes`, params: { id: String(runA.runId) } });
    expect(list.status).toBe(404);
  });

  it('refuses a vote for a component of another run (404 naming the component)', async () => {
    actAs(r1());
    const res = await put(runA.runId, runB.componentIds[0], { label: 'signal', baseVersion: 0 });
    expect(res.status).toBe(404);
    expect(res.json.error.message).toBe(
      `Component ${runB.componentIds[0]} is not a component of run ${runA.runId}. Vote on the components shown on this run's desk.`,
    );
  });

  it("refuses a label or noise kind outside the study's sets (422 with the field)", async () => {
    actAs(r1());
    const bad = await put(runA.runId, runA.componentIds[0], { label: 'artefact', baseVersion: 0 });
    expect(bad.status).toBe(422);
    expect(bad.json.error.fields.label[0]).toBe('must be one of signal, noise, uncertain');
    const kind = await put(runA.runId, runA.componentIds[0], { label: 'noise', noiseKind: 'ghost', baseVersion: 0 });
    expect(kind.status).toBe(422);
    expect(kind.json.error.fields.noiseKind[0]).toMatch(/must be one of motion, pulsation/);
    const mismatch = await put(runA.runId, runA.componentIds[0], { label: 'signal', noiseKind: 'motion', baseVersion: 0 });
    expect(mismatch.status).toBe(422);
    const conf = await put(runA.runId, runA.componentIds[0], { label: 'signal', confidence: 9, baseVersion: 0 });
    expect(conf.status).toBe(422);
    expect(conf.json.error.message).toMatch(/confidence/);
    const noLabel = await put(runA.runId, runA.componentIds[0], { note: 'hmm', baseVersion: 0 });
    expect(noLabel.status).toBe(422);
    expect(noLabel.json.error.message).toMatch(/choose signal, noise or uncertain/);
    expect(
      await db('votes')
        .where({ run_id: runA.runId })
        .count({ n: '*' })
        .then(([r]) => Number(r.n)),
    ).toBe(0);
  });
});

describe('saving, merging and auditing', () => {
  it('creates a vote, recomputes the decision in the same transaction, audits it; a repeat changes nothing', async () => {
    actAs(r1());
    const c = runA.componentIds[0];
    const res = await put(runA.runId, c, { label: 'noise', noiseKind: 'motion', confidence: 4, baseVersion: 0 });
    expect(res.status).toBe(200);
    expect(res.json).toMatchObject({
      changed: true,
      merged: false,
      vote: { label: 'noise', noiseKind: 'motion', confidence: 4, version: 1 },
    });
    const decision = await db('decisions').where({ component_id: c }).first();
    expect(decision.method).toBe('pending'); // one of two raters
    const again = await put(runA.runId, c, { label: 'noise', noiseKind: 'motion', baseVersion: 1 });
    expect(again.json).toMatchObject({ changed: false, vote: { version: 1 } });
    const audits = await db('audit_log')
      .where({ target_type: 'component', target_id: String(c) })
      .select('action', 'detail');
    expect(audits.map((a) => a.action)).toEqual(['vote.cast']);
  });

  it('merges two tabs field by field (last write per field wins) and audits the merge', async () => {
    actAs(r1());
    const c = runA.componentIds[1];
    await put(runA.runId, c, { label: 'signal', baseVersion: 0 }); // v1
    const tabA = await put(runA.runId, c, { note: 'default mode?', baseVersion: 1 }); // v2
    expect(tabA.json.vote.version).toBe(2);
    const tabB = await put(runA.runId, c, { confidence: 2, baseVersion: 1 }); // stale base → merge
    expect(tabB.json).toMatchObject({ merged: true, vote: { label: 'signal', note: 'default mode?', confidence: 2, version: 3 } });
    const last = await db('audit_log')
      .where({ target_type: 'component', target_id: String(c) })
      .orderBy('id', 'desc')
      .first('detail');
    const detail = typeof last.detail === 'string' ? JSON.parse(last.detail) : last.detail;
    expect(detail).toMatchObject({ merged: true, baseVersion: 1, storedVersion: 2, changes: { confidence: [null, 2] } });
    // changing the label away from noise clears the kind
    await put(runA.runId, c, { label: 'noise', noiseKind: 'csf', baseVersion: 3 });
    const cleared = await put(runA.runId, c, { label: 'uncertain', baseVersion: 4 });
    expect(cleared.json.vote).toMatchObject({ label: 'uncertain', noiseKind: null });
  });

  it('remembers the desk position and refuses one outside the run', async () => {
    actAs(r1());
    const ok = await callRoute(deskRoute.PUT, {
      method: 'PUT',
      url: `/api/runs/${runA.runId}/desk`,
      params: { id: String(runA.runId) },
      body: { componentIdx: 2 },
    });
    expect(ok.status).toBe(200);
    expect((await db('assignments').where({ run_id: runA.runId, rater_id: r1() }).first()).last_component_idx).toBe(2);
    const bad = await callRoute(deskRoute.PUT, {
      method: 'PUT',
      url: `/api/runs/${runA.runId}/desk`,
      params: { id: String(runA.runId) },
      body: { componentIdx: 999 },
    });
    expect(bad.status).toBe(422);
  });
});

describe('submission and release', () => {
  it('refuses submission while components are unlabelled, then accepts it; votes are frozen after submission', async () => {
    actAs(r1());
    const early = await callRoute(submitRoute.POST, {
      method: 'POST',
      url: `/api/runs/${runA.runId}/submit`,
      params: { id: String(runA.runId) },
    });
    expect(early.status).toBe(409);
    expect(early.json.error.message).toMatch(new RegExp(`^${runA.k - 2} of ${runA.k} components are not labelled yet`));
    for (const c of runA.componentIds.slice(2)) expect((await put(runA.runId, c, { label: 'signal', baseVersion: 0 })).status).toBe(200);
    const done = await callRoute(submitRoute.POST, {
      method: 'POST',
      url: `/api/runs/${runA.runId}/submit`,
      params: { id: String(runA.runId) },
    });
    expect(done.status).toBe(200);
    expect(done.json.already).toBe(false);
    // submitted votes are frozen (issue 13 item 2): only a lead's reopen lets the rater change them
    const change = await put(runA.runId, runA.componentIds[2], { label: 'uncertain', baseVersion: 1 });
    expect(change.status).toBe(409);
    expect(change.json.error.message).toMatch(
      /votes on it are frozen\. If a label must change, ask the study lead to reopen the run for you/,
    );
    expect((await db('votes').where({ component_id: runA.componentIds[2], rater_id: r1() }).first('label')).label).toBe('signal');
    expect(
      await db('audit_log')
        .where({ action: 'run.submit', target_id: String(runA.runId) })
        .count({ n: '*' })
        .then(([r]) => Number(r.n)),
    ).toBe(1);
  });

  it('refuses every vote change once the run is released (409)', async () => {
    const run = await db('runs').where({ id: runA.runId }).first('study_id');
    await db('releases').insert({ study_id: run.study_id, run_id: runA.runId, version: 1, released_by: users['lead@fernhollow.example'] });
    actAs(r1());
    await db('assignments').where({ run_id: runA.runId, rater_id: r1() }).update({ submitted_at: null }); // as if reopened: release still freezes
    const res = await put(runA.runId, runA.componentIds[0], { label: 'signal', baseVersion: 1 });
    expect(res.status).toBe(409);
    expect(res.json.error.message).toMatch(/has been released; its votes are frozen/);
    actAs(r2()); // not submitted, but frozen all the same
    expect((await put(runA.runId, runA.componentIds[0], { label: 'signal', baseVersion: 0 })).status).toBe(409);
    actAs(r1());
    const status = await callRoute(votesRoute.GET, { url: `/api/runs/${runA.runId}/votes`, params: { id: String(runA.runId) } });
    expect(status.json.status.released).toBe(true);
  });
});
