/**
 * The report page's current-state agreement is stored once per change of the ratings (issue 12
 * item 3; real MariaDB, real route handlers for votes and submissions): the first refresh computes
 * and stores it; with nothing changed a refresh computes nothing (the stored row, its time, stays);
 * a rater's vote and submission change the change key, the stored figures read as stale, and the
 * next refresh recomputes them. The stored figures are the ones the page computed on every view
 * before: buildAgreementReport(loadStudyRatings, BOOTSTRAP) — the same call, so the same seed
 * and resamples (lib/random) — compared here after the same JSON round trip the column makes.
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

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-stored-agreement-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb } = await import('@/lib/db/knex');
const { createStudyWithRaters } = await import('./helpers/factories');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const { loadStudyRatings } = await import('@/lib/db/queries/agreement');
const { agreementChangeKey } = await import('@/lib/db/queries/current-agreement');
const { buildAgreementReport } = await import('@/lib/reports/agreement-report');
const { BOOTSTRAP } = await import('@/lib/releases/create-release');
const { readCurrentAgreementReport, refreshCurrentAgreementReport } = await import('@/lib/releases/current-agreement-report');
const { queueAgreementReport } = await import('@/lib/releases/queue-agreement-report');
const { claimJob } = await import('@/lib/jobs/queue');
const { runClaimedJob } = await import('@/lib/worker/runner');
const { jobKinds } = await import('@/lib/worker/kinds');
const voteRoute = await import('@/app/api/runs/[id]/votes/[componentId]/route');
const submitRoute = await import('@/app/api/runs/[id]/submit/route');

let studyId: number;
let raterIds: number[];
let run: Awaited<ReturnType<typeof createReadyRun>>;

const vote = (componentId: number, body: unknown) =>
  callRoute(voteRoute.PUT, { method: 'PUT', url: '/', params: { id: String(run.runId), componentId: String(componentId) }, body });
const submit = () => callRoute(submitRoute.POST, { method: 'POST', url: '/', params: { id: String(run.runId) } });
const storedRow = () => db('study_agreement_reports').where({ study_id: studyId }).first('change_key', 'computed_at', 'run_count');
/** What the page computed on every view before the report was stored. */
const computedNow = async () => JSON.parse(JSON.stringify(buildAgreementReport(await loadStudyRatings({ studyId }), BOOTSTRAP)));

async function rateAndSubmit(raterId: number, labelOf: (i: number) => string) {
  actAs(raterId);
  for (const [i, id] of run.componentIds.entries()) {
    const label = labelOf(i);
    const res = await vote(id, { label, ...(label === 'noise' ? { noiseKind: 'motion' } : {}), baseVersion: 0 });
    expect(res.status).toBe(200);
  }
  expect((await submit()).status).toBe(200);
}

beforeAll(async () => {
  ({ studyId, raterIds } = await createStudyWithRaters(db, { raters: 3 }));
  const leadId = (await db('studies').where({ id: studyId }).first('created_by')).created_by as number;
  run = await createReadyRun(db, { studyId, createdBy: leadId, raterIds, size: 'tiny', seed: 11, sub: 'sa' });
  // two raters who mostly agree: α is defined
  await rateAndSubmit(raterIds[0], (i) => (i % 3 === 0 ? 'signal' : 'noise'));
  await rateAndSubmit(raterIds[1], (i) => (i % 3 === 0 || i === 1 ? 'signal' : 'noise'));
});

afterAll(async () => {
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('stored current-state agreement', () => {
  it('is computed and stored on the first refresh, with the figures the page computed on every view', async () => {
    expect(await storedRow()).toBeUndefined();
    expect((await readCurrentAgreementReport({ studyId })).stored).toBeNull();
    expect(await refreshCurrentAgreementReport({ studyId })).toEqual({ recomputed: true });
    const current = await readCurrentAgreementReport({ studyId });
    expect(current.fresh).toBe(true);
    expect(current.stored!.runCount).toBe(1);
    expect(current.stored!.report).toEqual(await computedNow());
    expect(current.stored!.report.summary?.raters).toHaveLength(2);
    expect(current.stored!.report.summary?.overall.krippendorffAlpha.value).toEqual(expect.any(Number));
  });

  it('is not computed again while the change key is the same', async () => {
    const before = await storedRow();
    expect(await agreementChangeKey({ studyId })).toBe(before.change_key);
    expect(await refreshCurrentAgreementReport({ studyId })).toEqual({ recomputed: false });
    const after = await storedRow();
    expect(after.computed_at.getTime()).toBe(before.computed_at.getTime());
    expect(after.change_key).toBe(before.change_key);
  });

  it('a vote changes the key: the stored figures read as stale, and the next refresh recomputes them', async () => {
    const before = await storedRow();
    actAs(raterIds[2]);
    expect((await vote(run.componentIds[0], { label: 'signal', baseVersion: 0 })).status).toBe(200);
    expect(await agreementChangeKey({ studyId })).not.toBe(before.change_key);
    expect((await readCurrentAgreementReport({ studyId })).fresh).toBe(false);
    expect(await refreshCurrentAgreementReport({ studyId })).toEqual({ recomputed: true });
    expect((await readCurrentAgreementReport({ studyId })).fresh).toBe(true);

    // the third rater finishes and submits: their votes now count (submitted_votes), a new key again
    const keyBefore = await agreementChangeKey({ studyId });
    await rateAndSubmit(raterIds[2], (i) => (i % 3 === 0 ? 'signal' : 'noise'));
    expect(await agreementChangeKey({ studyId })).not.toBe(keyBefore);
    expect((await readCurrentAgreementReport({ studyId })).fresh).toBe(false);
    expect(await refreshCurrentAgreementReport({ studyId })).toEqual({ recomputed: true });
    const current = await readCurrentAgreementReport({ studyId });
    expect(current.fresh).toBe(true);
    expect(current.stored!.report.summary?.raters).toHaveLength(3);
    expect(current.stored!.report).toEqual(await computedNow());
    expect(await refreshCurrentAgreementReport({ studyId })).toEqual({ recomputed: false });
  });

  it('two refreshes at once compute once (the second shares the first)', async () => {
    await db('users').where({ id: raterIds[0] }).update({ name: 'Renamed Rater' }); // a name in the report: the key changes
    const first = refreshCurrentAgreementReport({ studyId });
    const second = refreshCurrentAgreementReport({ studyId });
    expect(second).toBe(first); // the same computation, not a second one
    expect(await first).toEqual({ recomputed: true });
    const current = await readCurrentAgreementReport({ studyId });
    expect(current.fresh).toBe(true);
    expect(current.stored!.report.raters.map((r) => r.name)).toContain('Renamed Rater');
  });

  it('stale figures are brought up to date by the worker: one queued job per study, run by the agreement-report kind', async () => {
    await db('users').where({ id: raterIds[1] }).update({ name: 'Renamed Again' }); // the key changes
    expect((await readCurrentAgreementReport({ studyId })).fresh).toBe(false);
    const jobId = await queueAgreementReport({ studyId });
    expect(await queueAgreementReport({ studyId })).toBe(jobId); // a second stale view queues nothing new
    const job = await claimJob(db, { workerId: 'test-agreement', kinds: ['agreement-report'], leaseMs: 60_000 });
    expect(job?.id).toBe(jobId);
    const logger = { info: () => {}, warn: () => {}, error: (m: string) => console.error(m) };
    const outcome = await runClaimedJob(db, job!, { workerId: 'test-agreement', leaseMs: 60_000, kinds: jobKinds, logger });
    expect(outcome).toBe('succeeded');
    const current = await readCurrentAgreementReport({ studyId });
    expect(current.fresh).toBe(true);
    expect(current.stored!.report).toEqual(await computedNow());
    expect(await db('jobs').where({ id: jobId }).first('status')).toEqual({ status: 'succeeded' });
  });
});
