/**
 * Issue 13, faults: two leads decide the same component at once. Through the real route handler
 * and MariaDB (row lock on the decision): one decision is stored, the other lead gets 409 naming
 * who decided and what to do; both attempts are in the audit log. A lead deciding from a stale
 * list (the decision changed after they loaded it) is refused the same way.
 */
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb, toJson } = await import('@/lib/db/knex');
const { addMember, createRun, createStudyWithRaters, createUser } = await import('./helpers/factories');
const decisionsRoute = await import('@/app/api/studies/[id]/decisions/route');
const reconcileRoute = await import('@/app/api/studies/[id]/reconcile/route');

let studyId: number;
let leads: number[];
let components: number[];

beforeAll(async () => {
  const s = await createStudyWithRaters(db, { raters: 2, raters_per_run: 2, consensus_rule: 'unanimous' });
  studyId = s.studyId;
  const second = await createUser(db, { role: 'lead', name: 'Second Lead' });
  await addMember(db, { studyId, userId: second, studyRole: 'lead' });
  leads = [s.leadId, second];
  const runId = await createRun(db, {
    studyId,
    createdBy: s.leadId,
    file: { fileKey: 'runs/2026-12/concurrent.nii.gz', sha256: randomBytes(32).toString('hex'), sizeBytes: 1 },
    sub: 'cc',
  });
  await db('runs').where({ id: runId }).update({ status: 'ready' });
  const [decompositionId] = await db('decompositions').insert({ run_id: runId, parameters: toJson({}), k: 3, is_current: true });
  components = [];
  for (let idx = 1; idx <= 3; idx++) {
    const [id] = await db('components').insert({ decomposition_id: decompositionId, idx, variance_explained: 0.1, features: toJson({}) });
    components.push(Number(id));
    // the raters disagree: pending, waiting for a lead
    await db('votes').insert([
      { component_id: id, run_id: runId, rater_id: s.raterIds[0], label: 'signal' },
      { component_id: id, run_id: runId, rater_id: s.raterIds[1], label: 'noise', noise_kind: 'motion' },
    ]);
    await db('decisions').insert({ component_id: id, run_id: runId, method: 'pending' });
  }
  for (const r of s.raterIds) await db('assignments').insert({ run_id: runId, rater_id: r, submitted_at: db.fn.now(3) });
});
afterAll(closeDb);

const decide = (leadId: number, body: Record<string, unknown>) => {
  actAs(leadId);
  // the session is read synchronously when the call starts, so the next actAs does not leak into it
  return callRoute(decisionsRoute.POST, {
    method: 'POST',
    url: `/api/studies/${studyId}/decisions`,
    params: { id: String(studyId) },
    body,
  });
};

async function versionSeen(leadId: number, componentId: number): Promise<number> {
  actAs(leadId);
  const res = await callRoute(reconcileRoute.GET, { url: `/api/studies/${studyId}/reconcile`, params: { id: String(studyId) } });
  expect(res.status).toBe(200);
  const item = (res.json.items as { componentId: number; decision: { version: number } }[]).find((i) => i.componentId === componentId);
  expect(item, "the component waits in both leads' reconcile lists").toBeTruthy();
  return item!.decision.version;
}

describe('two leads deciding the same component', () => {
  it('at once: one wins, the other gets 409 with a clear message, both are audited', async () => {
    const c = components[0];
    const [v0, v1] = [await versionSeen(leads[0], c), await versionSeen(leads[1], c)];
    const [a, b] = await Promise.all([
      decide(leads[0], { componentId: c, label: 'noise', noiseKind: 'motion', reason: 'Rim at the brain edge', baseVersion: v0 }),
      decide(leads[1], { componentId: c, label: 'signal', reason: 'Looks like a network to me', baseVersion: v1 }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const [winner, loser] = a.status === 200 ? [a, b] : [b, a];
    const winnerLabel = winner === a ? 'noise' : 'signal';
    expect(loser.json.error.code).toBe('conflict');
    expect(loser.json.error.message).toMatch(/decided this component while you were looking at it/);
    expect(loser.json.error.message).toMatch(/Your decision was not saved/);
    expect(loser.json.error.message).not.toMatch(/ER_|SQL|at .*\.ts/);
    const stored = await db('decisions').where({ component_id: c }).first('label', 'method', 'decided_by as decidedBy');
    expect(stored).toMatchObject({ label: winnerLabel, method: 'reconciled', decidedBy: winner === a ? leads[0] : leads[1] });
    const audit = await db('audit_log')
      .where({ target_type: 'component', target_id: String(c) })
      .orderBy('id')
      .select('action', 'actor_id as actorId');
    expect(audit.map((e) => e.action).sort()).toEqual(['decision.conflict', 'decision.reconcile']);
    expect(new Set(audit.map((e) => e.actorId))).toEqual(new Set(leads));
  });

  it('from a stale list: refused although nobody is deciding at the same moment; a fresh look then overrides', async () => {
    const c = components[1];
    const stale = await versionSeen(leads[1], c);
    const first = await decide(leads[0], {
      componentId: c,
      label: 'noise',
      noiseKind: 'motion',
      reason: 'Rim at the brain edge',
      baseVersion: await versionSeen(leads[0], c),
    });
    expect(first.status).toBe(200);
    const late = await decide(leads[1], { componentId: c, label: 'signal', reason: 'Looks like a network to me', baseVersion: stale });
    expect(late.status).toBe(409);
    expect(late.json.error.message).toMatch(/it is now Noise/i);
    expect(await db('decisions').where({ component_id: c }).first('label')).toEqual({ label: 'noise' });
    // the second lead reloads (include=all lists decided components) and overrides knowingly
    actAs(leads[1]);
    const all = await callRoute(reconcileRoute.GET, {
      url: `/api/studies/${studyId}/reconcile?include=all`,
      params: { id: String(studyId) },
    });
    const fresh = all.json.items.find((i: { componentId: number }) => i.componentId === c).decision.version;
    const again = await decide(leads[1], { componentId: c, label: 'signal', reason: 'Looks like a network to me', baseVersion: fresh });
    expect(again.status).toBe(200);
    expect(await db('decisions').where({ component_id: c }).first('label')).toEqual({ label: 'signal' });
  });
});
