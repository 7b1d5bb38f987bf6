/**
 * Blinding in the desk's payloads and after submission (real MariaDB, real route handlers; issue 13
 * item 2). Until a rater submits, the components and votes payloads carry nothing of another
 * rater's vote; after submission the other votes appear only when the study shows them
 * (show_votes_after_submit), and only from raters who have submitted themselves. Submitted votes
 * are frozen until a lead reopens the run for the rater (audited with a reason); agreement reads
 * the votes as first submitted, and the earlier vote stays in the history. With the study's
 * blinding flag off, a rater sees submitted votes before submitting their own.
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
const { loadRatingFacts, loadStudyRatings } = await import('@/lib/db/queries/agreement');
const componentsRoute = await import('@/app/api/runs/[id]/components/route');
const votesRoute = await import('@/app/api/runs/[id]/votes/route');
const voteRoute = await import('@/app/api/runs/[id]/votes/[componentId]/route');
const submitRoute = await import('@/app/api/runs/[id]/submit/route');
const reopenRoute = await import('@/app/api/runs/[id]/assignments/[raterId]/reopen/route');

let users: Record<string, number>;
let studyId: number;
let run: Awaited<ReturnType<typeof createReadyRun>>;
const A = () => users['rater1@fernhollow.example'];
const B = () => users['rater2@fernhollow.example'];
const LEAD = () => users['lead@fernhollow.example'];

const p = () => ({ id: String(run.runId) });
const getVotes = () => callRoute(votesRoute.GET, { url: `/api/runs/${run.runId}/votes`, params: p() });
const getComponents = () => callRoute(componentsRoute.GET, { url: `/api/runs/${run.runId}/components`, params: p() });
const vote = (componentId: number, body: unknown) =>
  callRoute(voteRoute.PUT, { method: 'PUT', url: '/', params: { id: String(run.runId), componentId: String(componentId) }, body });
const submit = () => callRoute(submitRoute.POST, { method: 'POST', url: '/', params: p() });
const reopen = (raterId: number, body: unknown) =>
  callRoute(reopenRoute.POST, {
    method: 'POST',
    url: `/api/runs/${run.runId}/assignments/${raterId}/reopen`,
    params: { id: String(run.runId), raterId: String(raterId) },
    body,
  });

function keysIn(value: unknown, out = new Set<string>()): Set<string> {
  if (Array.isArray(value)) value.forEach((v) => keysIn(v, out));
  else if (value && typeof value === 'object')
    for (const [k, v] of Object.entries(value)) {
      out.add(k);
      keysIn(v, out);
    }
  return out;
}

beforeAll(async () => {
  const seeded = await seedDemo(db);
  users = seeded.users;
  studyId = seeded.studyId;
  run = await createReadyRun(db, { studyId, createdBy: LEAD(), raterIds: [A(), B()], size: 'tiny', seed: 5, sub: 'bl' });
  actAs(A());
  for (const id of run.componentIds) await vote(id, { label: 'noise', noiseKind: 'csf', baseVersion: 0 });
  await submit();
});

afterAll(async () => {
  await db('studies').where({ id: studyId }).update({ show_votes_after_submit: true, blinding: true });
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('blinding before submission', () => {
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
});

describe('after submission', () => {
  it("A (submitted) sees no vote of B while B has not submitted: not B's name, label or note", async () => {
    actAs(B());
    await vote(run.componentIds[0], { label: 'signal', note: 'B thinks this is visual cortex', baseVersion: 0 });
    actAs(A());
    const res = await getVotes();
    expect(res.json.status.othersHidden).toBeNull();
    expect(res.json.others).toEqual([]);
    expect(JSON.stringify(res.json)).not.toMatch(/Jonah Adeyemi|visual cortex/);
  });

  it("once B submits, A sees B's votes — only when the study shows them", async () => {
    actAs(B());
    for (const id of run.componentIds.slice(1)) await vote(id, { label: 'noise', noiseKind: 'motion', baseVersion: 0 });
    expect((await submit()).status).toBe(200);
    actAs(A());
    let res = await getVotes();
    expect(res.json.others).toHaveLength(run.k);
    expect(res.json.others[0]).toEqual({
      componentId: run.componentIds[0],
      raterName: 'Jonah Adeyemi',
      label: 'signal',
      noiseKind: null,
      confidence: null,
      note: 'B thinks this is visual cortex',
    });
    await db('studies').where({ id: studyId }).update({ show_votes_after_submit: false });
    res = await getVotes();
    expect(res.json.others).toBeNull();
    expect(res.json.status.othersHidden).toBe('study_hides');
    await db('studies').where({ id: studyId }).update({ show_votes_after_submit: true });
  });

  it("a submitted rater's votes are frozen: changing one is refused and nothing changes", async () => {
    actAs(A());
    const res = await vote(run.componentIds[0], { label: 'signal', baseVersion: 1 });
    expect(res.status).toBe(409);
    expect(res.json.error.message).toMatch(
      /your votes on it are frozen\. If a label must change, ask the study lead to reopen the run for you\./,
    );
    expect((await db('votes').where({ component_id: run.componentIds[0], rater_id: A() }).first('label')).label).toBe('noise');
    const decision = await db('decisions').where({ component_id: run.componentIds[0] }).first('method');
    expect(decision.method).not.toBe('unanimous'); // noise (A) vs signal (B): not decided by A changing sides
  });
});

describe("the lead's reopen", () => {
  it('is refused to raters (403), without a reason (422), and for a rater who has not submitted (409)', async () => {
    actAs(B());
    expect((await reopen(A(), { reason: 'I want to see' })).status).toBe(403);
    actAs(LEAD());
    const noReason = await reopen(A(), {});
    expect(noReason.status).toBe(422);
    expect(noReason.json.error.message).toMatch(/Give a reason for reopening/);
    const other = await createReadyRun(db, { studyId, createdBy: LEAD(), raterIds: [A()], size: 'tiny', seed: 6, sub: 'bx' });
    const open = await callRoute(reopenRoute.POST, {
      method: 'POST',
      url: '/',
      params: { id: String(other.runId), raterId: String(A()) },
      body: { reason: 'typo in component 3' },
    });
    expect(open.status).toBe(409);
    expect(open.json.error.message).toMatch(/has not submitted .* nothing to reopen/);
  });

  it('reopens A (audited with the reason); A changes a vote; the first submitted vote stays in the history and in agreement', async () => {
    actAs(LEAD());
    const res = await reopen(A(), { reason: 'component 1 labelled by mistake' });
    expect(res.status).toBe(200);
    expect(res.json).toMatchObject({ raterId: A(), reopenCount: 1 });
    const entry = await db('audit_log')
      .where({ action: 'assignment.reopen', target_id: String(run.runId) })
      .first('actor_id', 'detail');
    const detail = typeof entry.detail === 'string' ? JSON.parse(entry.detail) : entry.detail;
    expect(entry.actor_id).toBe(LEAD());
    expect(detail).toMatchObject({ raterId: A(), reason: 'component 1 labelled by mistake', reopenCount: 1 });

    // B (submitted) no longer sees A's votes while A's run is open again
    actAs(B());
    expect((await getVotes()).json.others).toEqual([]);

    actAs(A());
    const status = await getVotes();
    expect(status.json.status.submittedAt).toBeNull();
    expect(status.json.status.othersHidden).toBe('not_submitted'); // blind again while reopened
    const changed = await vote(run.componentIds[0], { label: 'signal', baseVersion: 1 });
    expect(changed.status).toBe(200);
    const change = await db('audit_log')
      .where({ action: 'vote.change', target_id: String(run.componentIds[0]), actor_id: A() })
      .orderBy('id', 'desc')
      .first('detail');
    const cd = typeof change.detail === 'string' ? JSON.parse(change.detail) : change.detail;
    expect(cd).toMatchObject({ afterReopen: true, changes: { label: ['noise', 'signal'] } });
    expect((await submit()).status).toBe(200);

    // the history keeps the vote as first submitted; the live vote is the changed one
    const first = await db('submitted_votes').where({ component_id: run.componentIds[0], rater_id: A() }).first('label', 'noise_kind');
    expect(first).toEqual({ label: 'noise', noise_kind: 'csf' });
    expect((await db('votes').where({ component_id: run.componentIds[0], rater_id: A() }).first('label')).label).toBe('signal');

    // agreement reads the first submitted votes: A's component 1 is still "noise"
    const ratings = await loadStudyRatings({ studyId, runIds: [run.runId] });
    const aFirst = ratings.votes.find((v) => v.raterId === A() && v.componentId === run.componentIds[0]);
    expect(aFirst?.label).toBe('noise');
    expect(ratings.votes.filter((v) => v.runId === run.runId)).toHaveLength(2 * run.k);

    // and the methods paragraph's facts count the reopening
    const facts = await loadRatingFacts({ studyId, runIds: [run.runId] });
    expect(facts).toMatchObject({ blinding: true, showVotesAfterSubmit: true, reopened: { assignments: 1, times: 1 }, raters: 2 });
  });

  it('is refused once the run is released', async () => {
    await db('releases').insert({ study_id: studyId, run_id: run.runId, version: 1, released_by: LEAD() });
    actAs(LEAD());
    const res = await reopen(B(), { reason: 'too late' });
    expect(res.status).toBe(409);
    expect(res.json.error.message).toMatch(/has been released/);
    await db('releases').where({ run_id: run.runId }).del();
  });
});

describe("the study's blinding flag", () => {
  it('off: a rater sees the submitted votes of others before submitting; on: hidden', async () => {
    const open = await createReadyRun(db, { studyId, createdBy: LEAD(), raterIds: [A(), B()], size: 'tiny', seed: 7, sub: 'bf' });
    const url = { url: `/api/runs/${open.runId}/votes`, params: { id: String(open.runId) } };
    actAs(A());
    for (const id of open.componentIds)
      await callRoute(voteRoute.PUT, {
        method: 'PUT',
        url: '/',
        params: { id: String(open.runId), componentId: String(id) },
        body: { label: 'signal', baseVersion: 0 },
      });
    expect((await callRoute(submitRoute.POST, { method: 'POST', url: '/', params: { id: String(open.runId) } })).status).toBe(200);
    actAs(B());
    let res = await callRoute(votesRoute.GET, url);
    expect(res.json.others).toBeNull();
    expect(res.json.status.othersHidden).toBe('not_submitted');
    await db('studies').where({ id: studyId }).update({ blinding: false });
    res = await callRoute(votesRoute.GET, url);
    expect(res.json.status.othersHidden).toBeNull();
    expect(res.json.others).toHaveLength(open.k);
    expect((await loadRatingFacts({ studyId })).blinding).toBe(false);
    await db('studies').where({ id: studyId }).update({ blinding: true });
  });
});
