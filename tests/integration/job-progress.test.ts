// Issue 15 item 4: once a worker has claimed a run's decompose job, the status API no longer says
// "Waiting for a worker", and the ICA stage reports its own progress (iterations, restarts)
// instead of sitting at one percentage. The real engine decomposes a phantom run; at every
// progress report the test reads GET /api/runs/:id/progress as the study's lead.
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb } = await import('@/lib/db/knex');
const { claimJob } = await import('@/lib/jobs');
const { jobKinds } = await import('@/lib/worker/kinds');
const { runClaimedJob } = await import('@/lib/worker/runner');
const { queueDecomposition } = await import('@/lib/runs/queue-job');
const { createPhantomRun, useTempUploads } = await import('./helpers/factories');
const progressRoute = await import('@/app/api/runs/[id]/progress/route');
type JobKind = import('@/lib/worker/types').JobKind;

let uploads: Awaited<ReturnType<typeof useTempUploads>>;
beforeAll(async () => {
  uploads = await useTempUploads();
  process.env.QUORUM_DECOMPOSE_THREADS = '1';
});
afterAll(async () => {
  await uploads.cleanup();
  await closeDb();
});

type Seen = { status: string; job: { stage: string | null; percent: number | null; message: string | null } | null };

describe('run progress while a worker decomposes', () => {
  it('says what the worker does (not "Waiting for a worker") and moves through the ICA stage iteration by iteration', async () => {
    await db('jobs').del();
    const { runId, leadId } = await createPhantomRun(db, { size: 'tiny', raters: 1 });
    const { jobId } = await queueDecomposition(db, { runId, createdBy: leadId, options: { restarts: 3 } });
    actAs(leadId);
    const ask = async (): Promise<Seen> => {
      const r = await callRoute(progressRoute.GET, { url: `/api/runs/${runId}/progress`, params: { id: String(runId) } });
      expect(r.status).toBe(200);
      return r.json as Seen;
    };
    expect((await ask()).job?.message).toBe('Waiting for a worker');

    // the real decompose kind; after each awaited report the test reads the status API, and it keeps
    // every report the engine's callback hands over (those are written in the background)
    const seen: Seen[] = [];
    const reports: { stage: string; percent: number; message: string | null | undefined }[] = [];
    const real = jobKinds.decompose!;
    const observed: JobKind = {
      ...real,
      run: (ctx) =>
        real.run({
          ...ctx,
          progress: async (stage, percent, message) => {
            await ctx.progress(stage, percent, message);
            seen.push(await ask());
          },
          progressSync: (stage, percent, message) => {
            reports.push({ stage, percent, message });
            ctx.progressSync(stage, percent, message);
          },
        }),
    };
    const job = await claimJob(db, { workerId: 'progress-test', leaseMs: 30_000, kinds: ['decompose'] });
    expect(job?.id).toBe(jobId);
    const outcome = await runClaimedJob(db, job!, {
      workerId: 'progress-test',
      leaseMs: 30_000,
      kinds: { decompose: observed },
      logger: { info() {}, warn() {}, error() {} },
    });
    expect(outcome).toBe('succeeded');

    expect(seen.map((s) => s.job?.stage)).toEqual(expect.arrayContaining(['reading', 'masking', 'features', 'writing']));
    expect(seen.every((s) => s.job?.message !== 'Waiting for a worker')).toBe(true);
    // the run is processing from the first stage after reading its row until the results are in
    expect(seen.filter((s) => s.job?.stage !== 'reading').every((s) => s.status === 'processing')).toBe(true);
    const ica = reports.filter((r) => r.stage === 'ica');
    // three restarts and the final run each report their iterations: more than one step, never backwards
    expect(new Set(ica.map((r) => Math.floor(r.percent))).size).toBeGreaterThanOrEqual(4);
    for (let i = 1; i < ica.length; i++) expect(ica[i]!.percent).toBeGreaterThanOrEqual(ica[i - 1]!.percent);
    expect(ica.some((r) => /^restart 2 of 3, iteration \d+$/.test(r.message ?? ''))).toBe(true);
    expect(ica.some((r) => /^final run on all voxels, iteration \d+$/.test(r.message ?? ''))).toBe(true);
    expect(Math.min(...ica.map((r) => r.percent))).toBeGreaterThanOrEqual(5 + 60 * 0.75);
    expect(Math.max(...ica.map((r) => r.percent))).toBeLessThanOrEqual(5 + 90 * 0.75);
    const done = await ask();
    expect(done.status).toBe('ready');
    expect(done.job).toMatchObject({ stage: 'done', percent: 100, message: null });
  });
});
