/**
 * A lead changes a run's assignments through the real route handlers, against the real MariaDB:
 * add a rater (decisions recomputed: a complete run waits again), remove a rater who has votes
 * (409 until confirmed; the votes stay; audited), reassign, due dates for one run or many; and the
 * refusals — no session, a rater, an observer, a rater member of the study, a lead of another study.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';
import { markSubmitted } from './helpers/submitted';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb, parseJson, toJson } = await import('@/lib/db/knex');
const { addMember, createStudyWithRaters, createUser, uniqueSuffix } = await import('./helpers/factories');
const studyRoute = await import('@/app/api/studies/[id]/assignments/route');
const overdueRoute = await import('@/app/api/studies/[id]/overdue/route');
const runRoute = await import('@/app/api/runs/[id]/assignments/route');
const raterRoute = await import('@/app/api/runs/[id]/assignments/[raterId]/route');

let s: { leadId: number; studyId: number; raterIds: number[] };
let other: { leadId: number; studyId: number; raterIds: number[] };
let observer: number;
let admin: number;

/** A ready run with a current decomposition of k components and the given raters assigned. */
async function run(studyId: number, createdBy: number, raterIds: number[], k = 3) {
  const [runId] = await db('runs').insert({
    study_id: studyId,
    sub: `c${uniqueSuffix()}`,
    ses: '1',
    task: 'rest',
    original_name: 'x_bold.nii.gz',
    file_key: `runs/${uniqueSuffix()}.nii.gz`,
    sha256: `${uniqueSuffix()}${uniqueSuffix()}`.padEnd(64, '0'),
    size_bytes: 1,
    status: 'ready',
    created_by: createdBy,
  });
  const [decompositionId] = await db('decompositions').insert({ run_id: runId, parameters: toJson({}), k, is_current: true });
  const componentIds: number[] = [];
  for (let i = 1; i <= k; i++) {
    const [id] = await db('components').insert({
      decomposition_id: decompositionId,
      idx: i,
      variance_explained: 0.1,
      features: toJson({}),
    });
    componentIds.push(Number(id));
  }
  for (const r of raterIds) await db('assignments').insert({ run_id: runId, rater_id: r });
  return { runId: Number(runId), componentIds };
}

async function voteAll(runId: number, componentIds: number[], raterId: number, label = 'signal') {
  for (const c of componentIds) await db('votes').insert({ component_id: c, run_id: runId, rater_id: raterId, label });
  await markSubmitted(db, { runId, raterId });
}

const add = (runId: number, body: unknown) =>
  callRoute(runRoute.POST, { method: 'POST', url: `/api/runs/${runId}/assignments`, params: { id: String(runId) }, body });
const remove = (runId: number, raterId: number, confirm = false) =>
  callRoute(raterRoute.DELETE, {
    method: 'DELETE',
    url: `/api/runs/${runId}/assignments/${raterId}${confirm ? '?confirm=1' : ''}`,
    params: { id: String(runId), raterId: String(raterId) },
  });
const change = (runId: number, raterId: number, body: unknown) =>
  callRoute(raterRoute.PATCH, {
    method: 'PATCH',
    url: `/api/runs/${runId}/assignments/${raterId}`,
    params: { id: String(runId), raterId: String(raterId) },
    body,
  });
const list = (studyId: number) =>
  callRoute(studyRoute.GET, { url: `/api/studies/${studyId}/assignments`, params: { id: String(studyId) } });
const bulk = (studyId: number, body: unknown) =>
  callRoute(studyRoute.PATCH, { method: 'PATCH', url: `/api/studies/${studyId}/assignments`, params: { id: String(studyId) }, body });
const audit = (runId: number, action: string) =>
  db('audit_log')
    .where({ target_type: 'run', target_id: String(runId), action })
    .orderBy('id');

beforeAll(async () => {
  s = await createStudyWithRaters(db, { raters: 4, raters_per_run: 2, consensus_rule: 'majority' });
  other = await createStudyWithRaters(db, { raters: 1 });
  observer = await createUser(db, { role: 'observer' });
  await addMember(db, { studyId: s.studyId, userId: observer, studyRole: 'observer' });
  admin = await createUser(db, { role: 'admin' });
});
afterAll(async () => {
  actAs(null);
  await closeDb();
});

describe('refusals', () => {
  it('no session → 401; rater and observer → 403; a lead of another study → 404; nothing changes', async () => {
    const r = await run(s.studyId, s.leadId, [s.raterIds[0]!]);
    const before = await db('assignments').where({ run_id: r.runId }).select('rater_id', 'due_at');
    actAs(null);
    expect((await add(r.runId, { raterId: s.raterIds[1] })).status).toBe(401);
    for (const who of [s.raterIds[0]!, observer]) {
      actAs(who);
      expect((await add(r.runId, { raterId: s.raterIds[1] })).status).toBe(403);
      expect((await remove(r.runId, s.raterIds[0]!, true)).status).toBe(403);
      expect((await list(s.studyId)).status).toBe(403);
      expect((await bulk(s.studyId, { runIds: [r.runId], dueAt: '2030-01-01' })).status).toBe(403);
    }
    actAs(other.leadId);
    expect((await add(r.runId, { raterId: s.raterIds[1] })).status).toBe(404);
    expect((await remove(r.runId, s.raterIds[0]!, true)).status).toBe(404);
    expect((await change(r.runId, s.raterIds[0]!, { replaceWith: other.raterIds[0] })).status).toBe(404);
    expect((await list(s.studyId)).status).toBe(404);
    expect((await bulk(s.studyId, { runIds: [r.runId], dueAt: '2030-01-01' })).status).toBe(404);
    expect(
      (await callRoute(overdueRoute.GET, { url: `/api/studies/${s.studyId}/overdue`, params: { id: String(s.studyId) } })).status,
    ).toBe(404);
    // the other lead's bulk call on their own study cannot reach this study's run
    const res = await bulk(other.studyId, { runIds: [r.runId], dueAt: '2030-01-01' });
    expect(res.json).toMatchObject({ runs: 0, skipped: 1, changed: 0 });
    expect(await db('assignments').where({ run_id: r.runId }).select('rater_id', 'due_at')).toEqual(before);
  });

  it('a lead cannot assign someone who is not a rater of the study, nor twice', async () => {
    const r = await run(s.studyId, s.leadId, [s.raterIds[0]!]);
    actAs(s.leadId);
    expect((await add(r.runId, { raterId: other.raterIds[0] })).status).toBe(422);
    expect((await add(r.runId, { raterId: observer })).status).toBe(422);
    expect((await add(r.runId, { raterId: s.raterIds[0] })).status).toBe(409);
    expect((await add(r.runId, { raterId: 'x' })).status).toBe(422);
  });
});

describe('changes by the lead', () => {
  it('adding a rater to a run whose decisions are complete recomputes them (pending again) and is audited', async () => {
    const r = await run(s.studyId, s.leadId, [s.raterIds[0]!, s.raterIds[1]!]);
    await voteAll(r.runId, r.componentIds, s.raterIds[0]!);
    await voteAll(r.runId, r.componentIds, s.raterIds[1]!);
    const { recomputeRunDecisions } = await import('@/lib/consensus/recompute');
    await recomputeRunDecisions(db, { runId: r.runId });
    expect(await db('decisions').where({ run_id: r.runId, method: 'unanimous' })).toHaveLength(3);

    actAs(s.leadId);
    const res = await add(r.runId, { raterId: s.raterIds[2], dueAt: '2030-01-31' });
    expect(res.status).toBe(200);
    expect(res.json).toMatchObject({ pendingBefore: 0, pendingAfter: 3 });
    expect(await db('decisions').where({ run_id: r.runId, method: 'pending' })).toHaveLength(3);
    const a = await db('assignments').where({ run_id: r.runId, rater_id: s.raterIds[2] }).first();
    expect(new Date(a.due_at).toISOString()).toBe('2030-01-31T23:59:59.999Z');
    expect(a.assigned_by).toBe(s.leadId);
    const [entry] = await audit(r.runId, 'assignment.add');
    expect(entry).toMatchObject({ actor_id: s.leadId, study_id: s.studyId });
  });

  it('removing a rater with votes needs confirmation; the votes stay; audited', async () => {
    const r = await run(s.studyId, s.leadId, [s.raterIds[0]!, s.raterIds[1]!]);
    await db('votes').insert({ component_id: r.componentIds[0], run_id: r.runId, rater_id: s.raterIds[0], label: 'noise' });
    actAs(s.leadId);
    const refused = await remove(r.runId, s.raterIds[0]!);
    expect(refused.status).toBe(409);
    expect(refused.json.error.message).toMatch(/1 vote on this run.*no longer count/);
    expect(refused.json.error.fields).toHaveProperty('confirm');
    expect(await db('assignments').where({ run_id: r.runId, rater_id: s.raterIds[0] })).toHaveLength(1);

    const ok = await remove(r.runId, s.raterIds[0]!, true);
    expect(ok.status).toBe(200);
    expect(ok.json).toMatchObject({ votesKept: 1 });
    expect(await db('assignments').where({ run_id: r.runId, rater_id: s.raterIds[0] })).toHaveLength(0);
    expect(await db('votes').where({ run_id: r.runId, rater_id: s.raterIds[0] })).toHaveLength(1);
    const [entry] = await audit(r.runId, 'assignment.remove');
    expect(parseJson(entry.detail)).toMatchObject({ raterId: s.raterIds[0], votesKept: 1 });

    // a rater without votes goes without confirmation
    expect((await remove(r.runId, s.raterIds[1]!)).status).toBe(200);
    expect((await remove(r.runId, s.raterIds[1]!)).status).toBe(404);
  });

  it('reassigns a place to another rater keeping the due date, with one audit entry', async () => {
    const r = await run(s.studyId, s.leadId, [s.raterIds[0]!]);
    await db('assignments')
      .where({ run_id: r.runId })
      .update({ due_at: new Date('2030-02-01T12:00:00Z') });
    actAs(admin);
    expect((await change(r.runId, s.raterIds[0]!, { replaceWith: s.raterIds[0] })).status).toBe(422);
    const res = await change(r.runId, s.raterIds[0]!, { replaceWith: s.raterIds[3] });
    expect(res.status).toBe(200);
    const rows = await db('assignments').where({ run_id: r.runId }).select('rater_id', 'due_at', 'assigned_by');
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ rater_id: s.raterIds[3], assigned_by: admin });
    expect(new Date(rows[0].due_at).toISOString()).toBe('2030-02-01T12:00:00.000Z');
    expect(await audit(r.runId, 'assignment.reassign')).toHaveLength(1);
  });

  it('due dates: per rater, per run, for many runs at once (open assignments only); the table shows progress', async () => {
    const r1 = await run(s.studyId, s.leadId, [s.raterIds[0]!, s.raterIds[1]!]);
    const r2 = await run(s.studyId, s.leadId, [s.raterIds[2]!]);
    await voteAll(r1.runId, r1.componentIds, s.raterIds[1]!);
    actAs(s.leadId);
    expect((await change(r1.runId, s.raterIds[0]!, { dueAt: '2020-01-01' })).status).toBe(200);
    const perRun = await callRoute(runRoute.PATCH, {
      method: 'PATCH',
      url: `/api/runs/${r2.runId}/assignments`,
      params: { id: String(r2.runId) },
      body: { dueAt: '2031-05-05' },
    });
    expect(perRun.json).toMatchObject({ changed: 1 });
    expect((await bulk(s.studyId, { runIds: [r1.runId, r2.runId], dueAt: 'soon' })).status).toBe(422);
    const many = await bulk(s.studyId, { runIds: [r1.runId, r2.runId], dueAt: '2020-06-01' });
    expect(many.json).toMatchObject({ runs: 2, skipped: 0, changed: 2 }); // the submitted assignment keeps its date
    expect(await audit(r1.runId, 'assignment.due')).toHaveLength(2);

    const table = await list(s.studyId);
    expect(table.status).toBe(200);
    const row = table.json.runs.find((x: { runId: number }) => x.runId === r1.runId);
    expect(row).toMatchObject({ total: 3 });
    const done = row.assignments.find((a: { raterId: number }) => a.raterId === s.raterIds[1]);
    expect(done).toMatchObject({ labelled: 3, overdue: false });
    expect(done.submittedAt).not.toBeNull();
    expect(row.assignments.find((a: { raterId: number }) => a.raterId === s.raterIds[0])).toMatchObject({ labelled: 0, overdue: true });
    expect(table.json.raters.map((x: { id: number }) => x.id).sort()).toEqual([...s.raterIds].sort());

    const overdue = await callRoute(overdueRoute.GET, { url: `/api/studies/${s.studyId}/overdue`, params: { id: String(s.studyId) } });
    expect(overdue.json.overdue.map((o: { runId: number; raterId: number }) => `${o.runId}:${o.raterId}`).sort()).toEqual(
      [`${r1.runId}:${s.raterIds[0]}`, `${r2.runId}:${s.raterIds[2]}`].sort(),
    );

    expect((await bulk(s.studyId, { runIds: [r1.runId, r2.runId], dueAt: null })).json).toMatchObject({ changed: 2 });
  });
});
