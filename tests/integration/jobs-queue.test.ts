// The job queue against the real MariaDB: enqueue, claim order, SKIP LOCKED under concurrency,
// leases, progress, retries, cancellation, the expired-lease sweep and release.
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { closeDb, createDb, db } from '@/lib/db/knex';
import { defineJobKind } from '@/lib/worker/types';
import {
  cancelJob,
  claimJob,
  completeJob,
  enqueueJob,
  failJob,
  getJob,
  JobPayloadError,
  releaseJob,
  renewLease,
  reportProgress,
  requeueExpiredLeases,
} from '@/lib/jobs';
import { runClaimedJob } from '@/lib/worker/runner';
import { decomposePayloadSchema } from '@/lib/jobs/payloads';
import { createPhantomRun, useTempUploads } from './helpers/factories';

const LEASE = 5_000;
const quiet = { info() {}, warn() {}, error() {} };
let uploads: Awaited<ReturnType<typeof useTempUploads>>;

beforeAll(async () => {
  uploads = await useTempUploads();
});
afterAll(async () => {
  await uploads.cleanup();
  await closeDb();
});
beforeEach(async () => {
  await db('jobs').del();
});

const job = (runId = 1, extra: Partial<Parameters<typeof enqueueJob>[1]> = {}) =>
  enqueueJob(db, { kind: 'decompose', payload: { runId }, ...extra });

describe('enqueueJob', () => {
  it('stores a queued job with its payload and refuses bad payloads and unknown kinds', async () => {
    const id = await job(7, { priority: 3, maxAttempts: 2 });
    const j = await getJob(db, id);
    expect(j).toMatchObject({ kind: 'decompose', status: 'queued', payload: { runId: 7 }, priority: 3, attempts: 0, maxAttempts: 2 });
    await expect(enqueueJob(db, { kind: 'decompose', payload: { runId: 'x' } as never })).rejects.toThrow(JobPayloadError);
    await expect(enqueueJob(db, { kind: 'decompose', payload: { runId: 1, extra: 1 } as never })).rejects.toThrow(/not valid/);
    await expect(enqueueJob(db, { kind: 'nonsense' as never, payload: {} as never })).rejects.toThrow(/Unknown job kind/);
  });
});

describe('claimJob', () => {
  it('takes the highest priority first, then the oldest, and skips jobs not yet due', async () => {
    const a = await job(1);
    const b = await job(2, { priority: 5 });
    await job(3, { priority: 9, delayMs: 60_000 });
    const c = await job(4);
    const order: number[] = [];
    for (;;) {
      const j = await claimJob(db, { workerId: 'w1', leaseMs: LEASE });
      if (!j) break;
      order.push(j.id);
      expect(j).toMatchObject({ status: 'running', attempts: 1, leaseOwner: 'w1' });
      expect(j.leaseExpiresAt!.getTime()).toBeGreaterThan(Date.now() - 1000);
    }
    expect(order).toEqual([b, a, c]);
  });

  it('only claims the kinds asked for', async () => {
    await job(1);
    expect(await claimJob(db, { workerId: 'w1', leaseMs: LEASE, kinds: ['denoise'] })).toBeNull();
    expect(await claimJob(db, { workerId: 'w1', leaseMs: LEASE, kinds: [] })).toBeNull();
    expect(await claimJob(db, { workerId: 'w1', leaseMs: LEASE, kinds: ['decompose'] })).not.toBeNull();
  });

  it('never gives one job to two claimers on separate connections', async () => {
    const ids: number[] = [];
    for (let i = 0; i < 30; i++) ids.push(await job(i + 1));
    const c1 = createDb();
    const c2 = createDb();
    try {
      const claimAll = async (conn: typeof db, workerId: string) => {
        const got: number[] = [];
        for (;;) {
          const j = await claimJob(conn, { workerId, leaseMs: LEASE });
          if (j) {
            got.push(j.id);
            continue;
          }
          const left = await conn('jobs').where({ status: 'queued' }).count({ n: '*' }).first();
          if (Number(left?.n) === 0) return got;
        }
      };
      const [g1, g2] = await Promise.all([claimAll(c1, 'w1'), claimAll(c2, 'w2')]);
      const all = [...g1, ...g2];
      expect(new Set(all).size).toBe(all.length);
      expect(all.sort((x, y) => x - y)).toEqual(ids);
      const owners = await db('jobs').select('id', 'lease_owner', 'attempts').whereIn('id', ids);
      for (const o of owners) {
        expect(o.attempts).toBe(1);
        expect(o.lease_owner).toBe(g1.includes(o.id) ? 'w1' : 'w2');
      }
    } finally {
      await c1.destroy();
      await c2.destroy();
    }
  });
});

describe('leases and progress', () => {
  it('renews and reports progress only for the owner of a running job', async () => {
    const id = await job(1);
    await claimJob(db, { workerId: 'w1', leaseMs: LEASE });
    expect(await renewLease(db, id, 'w1', LEASE)).toBe(true);
    expect(await renewLease(db, id, 'w2', LEASE)).toBe(false);
    expect(await reportProgress(db, id, 'w1', { stage: 'pca', percent: 42.5 })).toBe(true);
    expect(await reportProgress(db, id, 'w2', { stage: 'pca', percent: 50 })).toBe(false);
    expect(await getJob(db, id)).toMatchObject({ stage: 'pca', percent: 42.5 });
    expect(await completeJob(db, id, 'w2')).toBe(false);
    expect(await completeJob(db, id, 'w1', { ok: 1 })).toBe(true);
    expect(await getJob(db, id)).toMatchObject({ status: 'succeeded', percent: 100, result: { ok: 1 }, leaseOwner: null });
    expect(await reportProgress(db, id, 'w1', { stage: 'late', percent: 1 })).toBe(false);
  });

  it('re-queues an expired lease, and fails it with a readable message when out of attempts', async () => {
    const { runId } = await createPhantomRun(db);
    await db('runs').where({ id: runId }).update({ status: 'processing' });
    const a = await job(runId, { maxAttempts: 2, runId });
    await claimJob(db, { workerId: 'dead', leaseMs: LEASE });
    await db('jobs')
      .where({ id: a })
      .update({ lease_expires_at: db.raw('NOW(3) - INTERVAL 1 SECOND') });
    expect(await requeueExpiredLeases(db)).toEqual({ requeued: [a], failed: [] });
    expect(await getJob(db, a)).toMatchObject({ status: 'queued', attempts: 1, leaseOwner: null });
    expect((await db('runs').where({ id: runId }).first()).status).toBe('queued');
    // the dead worker's late reports are refused
    expect(await reportProgress(db, a, 'dead', { stage: 'ica', percent: 80 })).toBe(false);

    await claimJob(db, { workerId: 'dead2', leaseMs: LEASE });
    await db('jobs')
      .where({ id: a })
      .update({ lease_expires_at: db.raw('NOW(3) - INTERVAL 1 SECOND') });
    expect(await requeueExpiredLeases(db)).toEqual({ requeued: [], failed: [a] });
    const j = await getJob(db, a);
    expect(j).toMatchObject({ status: 'failed', attempts: 2 });
    expect(j!.message).toBe('The worker stopped responding (lease expired) after 2 attempts.');
    const run = await db('runs').where({ id: runId }).first();
    expect(run.status).toBe('failed');
    expect(run.status_message).toBe(j!.message);
  });

  it('a released job goes back to the queue without counting the attempt', async () => {
    const id = await job(1);
    await claimJob(db, { workerId: 'w1', leaseMs: LEASE });
    expect(await releaseJob(db, id, 'w2')).toBe(false);
    expect(await releaseJob(db, id, 'w1')).toBe(true);
    expect(await getJob(db, id)).toMatchObject({ status: 'queued', attempts: 0, leaseOwner: null });
  });
});

describe('failJob', () => {
  it('retries with a back-off while attempts remain, then fails with the message and the detail', async () => {
    const { runId } = await createPhantomRun(db);
    await db('runs').where({ id: runId }).update({ status: 'processing' });
    const id = await job(runId, { maxAttempts: 2, runId });
    await claimJob(db, { workerId: 'w1', leaseMs: LEASE });
    expect(await failJob(db, id, 'w1', { message: 'Disk hiccup.', error: 'stack 1', retryBaseMs: 60_000 })).toBe('retry');
    let j = await getJob(db, id);
    expect(j).toMatchObject({ status: 'queued', attempts: 1, error: 'stack 1' });
    expect(j!.message).toMatch(/^Attempt 1 of 2 failed: Disk hiccup\. Retrying in 60 s\.$/);
    expect(j!.runAfter.getTime()).toBeGreaterThan(Date.now() + 30_000);
    // not due yet
    expect(await claimJob(db, { workerId: 'w1', leaseMs: LEASE })).toBeNull();
    await db('jobs')
      .where({ id })
      .update({ run_after: db.raw('NOW(3)') });
    await claimJob(db, { workerId: 'w1', leaseMs: LEASE });
    expect(await failJob(db, id, 'w2', { message: 'not mine' })).toBe('lost');
    expect(await failJob(db, id, 'w1', { message: 'Disk hiccup again.', error: 'stack 2' })).toBe('failed');
    j = await getJob(db, id);
    expect(j).toMatchObject({ status: 'failed', attempts: 2, message: 'Disk hiccup again.', error: 'stack 2' });
    expect(j!.finishedAt).not.toBeNull();
    const run = await db('runs').where({ id: runId }).first();
    expect(run).toMatchObject({ status: 'failed', status_message: 'Disk hiccup again.' });
  });

  it('a permanent failure does not retry', async () => {
    const id = await job(1, { maxAttempts: 5 });
    await claimJob(db, { workerId: 'w1', leaseMs: LEASE });
    expect(await failJob(db, id, 'w1', { message: 'Bad.', permanent: true })).toBe('failed');
    expect(await getJob(db, id)).toMatchObject({ status: 'failed', attempts: 1 });
  });
});

describe('cancelJob', () => {
  it('a cancelled queued job is never claimed', async () => {
    const id = await job(1);
    expect(await cancelJob(db, id)).toBe('cancelled');
    expect(await claimJob(db, { workerId: 'w1', leaseMs: LEASE })).toBeNull();
    expect(await getJob(db, id)).toMatchObject({ status: 'cancelled' });
    expect(await cancelJob(db, id)).toBe('finished');
    expect(await cancelJob(db, 987654321)).toBe('not_found');
  });

  it('a running job notices the cancellation at its next progress report and stops', async () => {
    const id = await job(1);
    const claimed = await claimJob(db, { workerId: 'w1', leaseMs: LEASE });
    let reached = '';
    const kind = defineJobKind({
      kind: 'decompose',
      payloadSchema: decomposePayloadSchema,
      async run(ctx) {
        await ctx.progress('reading', 10);
        expect(await cancelJob(db, id)).toBe('cancelling');
        try {
          await ctx.progress('pca', 50);
        } catch (err) {
          reached = (err as Error).name;
          throw err;
        }
        reached = 'went on';
        return { done: true };
      },
    });
    const outcome = await runClaimedJob(db, claimed!, { workerId: 'w1', leaseMs: LEASE, kinds: { decompose: kind }, logger: quiet });
    expect(outcome).toBe('cancelled');
    expect(reached).toBe('JobCancelled');
    expect(await getJob(db, id)).toMatchObject({ status: 'cancelled', stage: 'cancelled' });
  });
});

describe('payload checks when claimed', () => {
  it('a job with a bad payload fails at once with a clear message', async () => {
    const [id] = await db('jobs').insert({ kind: 'decompose', payload: JSON.stringify({ runId: 'seven' }), max_attempts: 3 });
    const claimed = await claimJob(db, { workerId: 'w1', leaseMs: LEASE });
    expect(claimed!.id).toBe(Number(id));
    const kinds = { decompose: defineJobKind({ kind: 'decompose', payloadSchema: decomposePayloadSchema, run: async () => null }) };
    expect(await runClaimedJob(db, claimed!, { workerId: 'w1', leaseMs: LEASE, kinds, logger: quiet })).toBe('failed');
    const j = await getJob(db, Number(id));
    expect(j).toMatchObject({ status: 'failed', attempts: 1 });
    expect(j!.message).toMatch(/^The job's payload is not valid for kind decompose: runId: /);
  });
});
