/**
 * Two runs of a study uploaded with the same BIDS entities: the release is refused (their files
 * would share names) until a lead corrects one run's labels through PATCH /api/runs/:id, against
 * the real MariaDB and the real route handlers. The change is audited; labels another run holds
 * are refused; observers and raters may not change labels; once released, labels are frozen.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdtemp } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { actAs, callRoute } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => (await import('../e2e/helpers/route-call')).currentSession()),
}));

process.env.QUORUM_UPLOADS_DIR = await mkdtemp(path.join(os.tmpdir(), 'quorum-relabel-'));

const { db, closeDb } = await import('@/lib/db/knex');
const { seedDemo } = await import('@/db/seeds/demo');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const runRoute = await import('@/app/api/runs/[id]/route');
const releasesRoute = await import('@/app/api/studies/[id]/releases/route');
const { buildRequestedRelease } = await import('./helpers/release-jobs');

let users: Record<string, number>;
let studyId: number;
let first: number;
let twin: number;
const u = (name: string) => users[`${name}@fernhollow.example`]!;
const patch = (runId: number, body: unknown) =>
  callRoute(runRoute.PATCH, { method: 'PATCH', url: `/api/runs/${runId}`, params: { id: String(runId) }, body });
const release = () =>
  callRoute(releasesRoute.POST, { method: 'POST', url: `/api/studies/${studyId}/releases`, params: { id: String(studyId) }, body: {} });

beforeAll(async () => {
  users = (await seedDemo(db)).users;
  const [id] = await db('studies').insert({
    name: 'Relabel study ' + Date.now(),
    created_by: u('lead'),
    raters_per_run: 1,
    consensus_rule: 'majority',
    label_set: JSON.stringify(['signal', 'noise']),
    noise_kinds: JSON.stringify(['other']),
  });
  studyId = Number(id);
  for (const [who, role] of [
    ['lead', 'lead'],
    ['rater1', 'rater'],
    ['observer', 'observer'],
  ] as const)
    await db('study_members').insert({ study_id: studyId, user_id: u(who), study_role: role });
  const made = [];
  for (const seed of [41, 42]) {
    const run = await createReadyRun(db, {
      studyId,
      createdBy: u('lead'),
      raterIds: [u('rater1')],
      size: 'tiny',
      seed,
      sub: 'twin01',
      components: 4,
    });
    for (const componentId of run.componentIds)
      await db('decisions').insert({ component_id: componentId, run_id: run.runId, label: 'signal', method: 'unanimous' });
    made.push(run.runId);
  }
  [first, twin] = made as [number, number];
});

afterAll(async () => {
  await closeDb();
});

describe('correcting the labels of one of two runs with the same entities', () => {
  it('refuses the release while the names clash', async () => {
    actAs(u('lead'));
    const res = await release();
    expect(res.status).toBe(409);
    expect(res.json.error.message).toContain(`Runs ${first} and ${twin} have the same BIDS entities (sub-twin01_ses-1_task-rest)`);
  });

  it('lets neither an observer nor a rater change labels', async () => {
    actAs(u('observer'));
    expect((await patch(twin, { sub: 'twin01', ses: '1', task: 'rest', run: '2' })).status).toBe(403);
    actAs(u('rater1'));
    expect((await patch(twin, { sub: 'twin01', ses: '1', task: 'rest', run: '2' })).status).toBe(403);
    expect((await db('runs').where({ id: twin }).first('run_label')).run_label).toBeNull();
  });

  it('refuses bad labels with the field named, and labels another run already has', async () => {
    actAs(u('lead'));
    const bad = await patch(twin, { sub: 'sub-01', task: 'rest' });
    expect(bad.status).toBe(422);
    expect(bad.json.error.message).toMatch(/^The label change is not valid \(sub\): .*letters and digits.*\.$/);
    expect(bad.json.error.message.endsWith('..')).toBe(false);
    await db('runs').where({ id: first }).update({ acq: 'hi' });
    const taken = await patch(twin, { sub: 'twin01', ses: '1', task: 'rest', acq: 'hi' });
    expect(taken.status).toBe(409);
    expect(taken.json.error.message).toContain(`Run #${first}`);
    expect(taken.json.error.message).toContain('sub-twin01_ses-1_task-rest_acq-hi');
    await db('runs').where({ id: first }).update({ acq: null });
  });

  it('changes the labels, audits old and new names, and the release then goes through with both runs', async () => {
    actAs(u('lead'));
    const res = await patch(twin, { sub: 'twin01', ses: '1', task: 'rest', acq: '', run: '2' });
    expect(res.status, JSON.stringify(res.json)).toBe(200);
    expect(res.json.run).toMatchObject({ id: twin, sub: 'twin01', ses: '1', task: 'rest', acq: null, runLabel: '2' });
    const audit = await db('audit_log').where({ action: 'run.relabel', target_id: twin }).first('actor_id', 'detail', 'study_id');
    const detail = typeof audit.detail === 'string' ? JSON.parse(audit.detail) : audit.detail;
    expect(audit.actor_id).toBe(u('lead'));
    expect(detail).toEqual({ from: 'sub-twin01_ses-1_task-rest', to: 'sub-twin01_ses-1_task-rest_run-2' });
    // the request queues the release (202); the worker's job builds it
    const rel = await buildRequestedRelease(db, await release());
    expect(rel.status, JSON.stringify(rel.json)).toBe(202);
    expect(rel.json.jobStatus, rel.json.jobMessage).toBe('succeeded');
    const manifest = (await db('releases').where({ id: rel.json.releaseId }).first('manifest')).manifest;
    const stems = (typeof manifest === 'string' ? JSON.parse(manifest) : manifest).runs.map((r: { stem: string }) => r.stem).sort();
    expect(stems).toEqual(['sub-twin01_ses-1_task-rest', 'sub-twin01_ses-1_task-rest_run-2']);
  });

  it('refuses to change the labels of a released run', async () => {
    actAs(u('lead'));
    const res = await patch(twin, { sub: 'twin01', ses: '1', task: 'rest', run: '3' });
    expect(res.status).toBe(409);
    expect(res.json.error.message).toContain('already in a release');
    expect((await db('runs').where({ id: twin }).first('run_label')).run_label).toBe('2');
  });
});
