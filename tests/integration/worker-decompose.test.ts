// The decompose job kind end to end with the real engine on phantom runs: in-process (outputs,
// idempotent re-runs, a lost lease, failures) and with worker processes (two workers, SIGKILL
// mid-job, cancellation, SIGTERM release).
import { existsSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { readFile, rm, stat, truncate, writeFile } from 'node:fs/promises';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { blobToFloat32, closeDb, db, parseJson } from '@/lib/db/knex';
import { cancelJob, claimJob, getJob, latestJobForRun, requeueExpiredLeases } from '@/lib/jobs';
import { jobKinds } from '@/lib/worker/kinds';
import { queueDecomposition } from '@/lib/runs/queue-job';
import { runClaimedJob } from '@/lib/worker/runner';
import { readNiftiFile, writeNiftiFile } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput } from '@/lib/phantom';
import { assignRaters } from '@/lib/runs/assign-raters';
import { ensureDirFor, newKey, pathFor } from '@/lib/storage';
import { createPhantomRun, createRun, useTempUploads, writePhantomRunFile } from './helpers/factories';
import { spawnWorker, waitFor } from './helpers/worker-process';

const quiet = { info() {}, warn() {}, error() {} };
let uploads: Awaited<ReturnType<typeof useTempUploads>>;

beforeAll(async () => {
  uploads = await useTempUploads();
  process.env.QUORUM_DECOMPOSE_THREADS = '1';
});
afterAll(async () => {
  await uploads.cleanup();
  await closeDb();
});
beforeEach(async () => {
  await db('jobs').del();
});

/** Claims and runs the next job in this process as worker `workerId`. */
async function runNext(workerId = 'inproc', leaseMs = 10_000, retryBaseMs = 0) {
  const job = await claimJob(db, { workerId, leaseMs, kinds: Object.keys(jobKinds) });
  if (!job) return null;
  return runClaimedJob(db, job, { workerId, leaseMs, kinds: jobKinds, logger: quiet, retryBaseMs });
}

async function currentDecompositions(runId: number) {
  return db('decompositions').where({ run_id: runId, is_current: true });
}

describe('decompose in process', () => {
  it('decomposes a phantom run: run ready, k components with blobs and features, files on the run grid, raters assigned', async () => {
    const { runId, raterIds, file } = await createPhantomRun(db, { raters: 3, raters_per_run: 2 });
    const { jobId, existing } = await queueDecomposition(db, { runId });
    expect(existing).toBe(false);
    expect((await db('runs').where({ id: runId }).first()).status).toBe('queued');
    expect((await queueDecomposition(db, { runId })).jobId).toBe(jobId);

    expect(await runNext()).toBe('succeeded');
    const job = await getJob(db, jobId);
    expect(job).toMatchObject({ status: 'succeeded', percent: 100 });
    const run = await db('runs').where({ id: runId }).first();
    expect(run.status).toBe('ready');

    const [d, ...more] = await currentDecompositions(runId);
    expect(more).toHaveLength(0);
    expect(d.k).toBeGreaterThanOrEqual(2);
    expect(job!.result).toMatchObject({ decompositionId: d.id, k: d.k });
    // the component maps' SHA-256 and size are kept with the decomposition, so a release ships them without hashing again
    const mapFile = await readFile(pathFor(d.components_key));
    expect({ sha256: d.components_sha256, bytes: Number(d.components_bytes) }).toEqual({
      sha256: createHash('sha256').update(mapFile).digest('hex'),
      bytes: mapFile.length,
    });
    const params = parseJson<Record<string, unknown>>(d.parameters)!;
    expect(params).toMatchObject({
      mask: 'automatic',
      dropVolumes: 0,
      varianceNorm: true,
      detrend: false,
      dimMethod: 'iid-mdl',
      seed: 1,
      contrast: 'logcosh',
    });
    const summary = parseJson<Record<string, unknown>>(d.summary)!;
    expect(summary).toMatchObject({ components: d.k, timepoints: 80 });

    const comps = await db('components').where({ decomposition_id: d.id }).orderBy('idx');
    expect(comps.map((c) => c.idx)).toEqual(Array.from({ length: d.k }, (_, i) => i + 1));
    for (let i = 0; i < comps.length; i++) {
      const c = comps[i];
      expect(blobToFloat32(c.timecourse)!.length).toBe(80);
      const f = blobToFloat32(c.frequencies)!;
      expect(blobToFloat32(c.spectrum)!.length).toBe(f.length);
      expect(f[f.length - 1]).toBeCloseTo(0.25, 5); // Nyquist at TR 2 s
      const features = parseJson<Record<string, unknown>>(c.features)!;
      expect(typeof features.highFrequencyPower).toBe('number');
      expect(features.motionCorrelation).toBeNull();
      if (i > 0) expect(c.variance_explained).toBeLessThanOrEqual(comps[i - 1].variance_explained);
    }

    const maps = await readNiftiFile(pathFor(d.components_key));
    expect([maps.nx, maps.ny, maps.nz, maps.nt]).toEqual([...file.phantom.dims.slice(0, 3), d.k]);
    const mean = await readNiftiFile(pathFor(d.mean_key));
    expect(mean.nt).toBe(1);
    const mask = await readNiftiFile(pathFor(d.mask_key));
    const mv = mask.readVolume(0);
    let inMask = 0;
    for (const v of mv) if (v) inMask++;
    expect(inMask).toBe(summary.voxelsInMask);

    const assignments = await db('assignments').where({ run_id: runId }).orderBy('rater_id');
    expect(assignments.map((a) => a.rater_id)).toEqual(raterIds.slice(0, 2));
    expect(await latestJobForRun(db, { runId })).toMatchObject({ id: jobId, status: 'succeeded', percent: 100 });
  });

  it('uses the uploaded mask, the motion table (degrees, translations first) and the protocol drop', async () => {
    const { runId, file } = await createPhantomRun(db, { drop_volumes: 4, dim_method: 'fixed', fixed_components: 5 });
    const p = file.phantom;
    const maskKey = newKey('masks', '.nii.gz');
    await writeNiftiFile(await ensureDirFor(maskKey), {
      dims: p.dims.slice(0, 3),
      pixdim: p.voxelSize,
      affine: p.affine,
      datatype: 'uint8',
      data: p.truth.brainMask,
    });
    const motionKey = newKey('motion', '.tsv');
    const rows = Array.from({ length: p.dims[3] }, (_, t) =>
      [...p.motion.translations.map((c) => c[t]!), ...p.motion.rotations.map((c) => (c[t]! * 180) / Math.PI)].join('\t'),
    );
    await writeFile(await ensureDirFor(motionKey), `# tx ty tz rx ry rz\n${rows.join('\n')}\n`);
    await db('runs')
      .where({ id: runId })
      .update({ mask_key: maskKey, motion_key: motionKey, motion_order: 'tx,ty,tz,rx,ry,rz', motion_rotation_units: 'degrees' });
    await queueDecomposition(db, { runId });
    expect(await runNext()).toBe('succeeded');
    const [d] = await currentDecompositions(runId);
    expect(d.k).toBe(5);
    expect(parseJson(d.parameters)).toMatchObject({
      mask: 'uploaded',
      dropVolumes: 4,
      components: 5,
      motion: { order: 'trans-first', rotationUnits: 'degrees' },
    });
    const summary = parseJson<Record<string, number>>(d.summary)!;
    expect(summary.timepoints).toBe(p.dims[3] - 4);
    let brain = 0;
    for (const v of p.truth.brainMask) if (v) brain++;
    expect(summary.voxelsInMask).toBeLessThanOrEqual(brain);
    expect(summary.voxelsInMask).toBeGreaterThan(brain * 0.9);
    const comps = await db('components').where({ decomposition_id: d.id }).orderBy('idx');
    for (const c of comps) {
      expect(blobToFloat32(c.timecourse)!.length).toBe(p.dims[3] - 4);
      const f = parseJson<Record<string, number | null>>(c.features)!;
      expect(f.motionCorrelation).toBeGreaterThanOrEqual(0);
      expect(f.meanFramewiseDisplacement).toBeGreaterThan(0);
    }
  });

  it("a motion table with the wrong number of rows fails at once with the parser's message", async () => {
    const { runId } = await createPhantomRun(db);
    const motionKey = newKey('motion', '.txt');
    await writeFile(await ensureDirFor(motionKey), '0 0 0 0 0 0\n0 0 0 0 0 0\n');
    await db('runs')
      .where({ id: runId })
      .update({ motion_key: motionKey, motion_order: 'rx,ry,rz,tx,ty,tz', motion_rotation_units: 'radians' });
    const { jobId } = await queueDecomposition(db, { runId });
    expect(await runNext()).toBe('failed');
    const job = await getJob(db, jobId);
    expect(job!.attempts).toBe(1);
    expect(job!.message).toMatch(/motion/i);
    expect((await db('runs').where({ id: runId }).first()).status_message).toBe(job!.message);
  });

  it('deterministic failures (no positive voxels, no finite data) fail at once, not after the retries (issue 13 item 10)', async () => {
    for (const [fill, message] of [
      [0, /no positive voxels/],
      [Number.NaN, /no positive voxels|finite/],
    ] as const) {
      const { runId } = await createPhantomRun(db);
      const phantom = generatePhantom({ size: 'tiny', seed: 1 });
      phantom.data.fill(fill);
      await writeNiftiFile(pathFor((await db('runs').where({ id: runId }).first('file_key')).file_key), phantomToNiftiInput(phantom));
      const { jobId } = await queueDecomposition(db, { runId, maxAttempts: 3 });
      expect(await runNext()).toBe('failed');
      const job = await getJob(db, jobId);
      expect(job).toMatchObject({ status: 'failed', attempts: 1 });
      expect(job!.message).toMatch(message);
      expect((await db('runs').where({ id: runId }).first()).status).toBe('failed');
    }
  });

  it('a second decomposition replaces the current one and keeps the assignments', async () => {
    const { runId } = await createPhantomRun(db, { raters: 2 });
    await queueDecomposition(db, { runId });
    expect(await runNext()).toBe('succeeded');
    const [first] = await currentDecompositions(runId);
    await queueDecomposition(db, { runId, options: { components: 4, seed: 7 } });
    expect(await runNext()).toBe('succeeded');
    const current = await currentDecompositions(runId);
    expect(current).toHaveLength(1);
    expect(current[0].id).not.toBe(first.id);
    expect(current[0].k).toBe(4);
    expect(parseJson<Record<string, unknown>>(current[0].parameters)).toMatchObject({ components: 4, seed: 7 });
    expect(await db('components').where({ decomposition_id: current[0].id }).count({ n: '*' }).first()).toEqual({ n: 4 });
    expect(await db('decompositions').where({ run_id: runId }).count({ n: '*' }).first()).toEqual({ n: 2 });
    expect(await db('assignments').where({ run_id: runId }).count({ n: '*' }).first()).toEqual({ n: 2 });
  });

  it('a worker that lost its lease writes nothing; the worker that took over writes one set of components', async () => {
    const { runId } = await createPhantomRun(db);
    const { jobId } = await queueDecomposition(db, { runId });
    const slow = await claimJob(db, { workerId: 'slow', leaseMs: 10_000 });
    // the slow worker's lease expires and another worker takes the job
    await db('jobs')
      .where({ id: jobId })
      .update({ lease_expires_at: db.raw('NOW(3) - INTERVAL 1 SECOND') });
    expect((await requeueExpiredLeases(db)).requeued).toEqual([jobId]);
    const fast = await claimJob(db, { workerId: 'fast', leaseMs: 10_000 });
    expect(fast!.attempts).toBe(2);
    const opts = { leaseMs: 10_000, kinds: jobKinds, logger: quiet };
    const [a, b] = await Promise.all([
      runClaimedJob(db, slow!, { ...opts, workerId: 'slow' }),
      runClaimedJob(db, fast!, { ...opts, workerId: 'fast' }),
    ]);
    expect([a, b]).toEqual(['lost', 'succeeded']);
    expect(await currentDecompositions(runId)).toHaveLength(1);
    expect(await db('decompositions').where({ run_id: runId }).count({ n: '*' }).first()).toEqual({ n: 1 });
    expect(await getJob(db, jobId)).toMatchObject({ status: 'succeeded', attempts: 2 });
  });

  it('a missing run file fails after the configured attempts with a readable message on the job and the run', async () => {
    const { runId, file } = await createPhantomRun(db);
    await rm(pathFor(file.fileKey));
    const { jobId } = await queueDecomposition(db, { runId, maxAttempts: 2 });
    expect(await runNext()).toBe('retry');
    expect((await getJob(db, jobId))!.message).toMatch(/^Attempt 1 of 2 failed: The run's file is missing from storage/);
    expect(await runNext()).toBe('failed');
    const job = await getJob(db, jobId);
    expect(job).toMatchObject({ status: 'failed', attempts: 2, message: "The run's file is missing from storage; upload it again." });
    expect(job!.error).toMatch(/ENOENT/);
    const run = await db('runs').where({ id: runId }).first();
    expect(run).toMatchObject({ status: 'failed', status_message: job!.message });
    expect(await db('decompositions').where({ run_id: runId })).toHaveLength(0);
  });

  it('a run that no longer exists fails at once', async () => {
    const { runId } = await createPhantomRun(db);
    const { jobId } = await queueDecomposition(db, { runId });
    // a job whose run row vanished without the cascade (e.g. payload pointing elsewhere)
    await db('jobs')
      .where({ id: jobId })
      .update({ payload: JSON.stringify({ runId: 2_000_000_000 }), run_id: null });
    expect(await runNext()).toBe('failed');
    expect(await getJob(db, jobId)).toMatchObject({ attempts: 1, message: 'Run 2000000000 no longer exists.' });
  });
});

describe('assignRaters', () => {
  it('balances open work: fewest open assignments first, ties by id; skips runs already assigned', async () => {
    const a = await createPhantomRun(db, { raters: 3, raters_per_run: 2 });
    const file2 = await writePhantomRunFile({ seed: 2 });
    const run2 = await createRun(db, { studyId: a.studyId, createdBy: a.leadId, file: file2 });
    const file3 = await writePhantomRunFile({ seed: 3 });
    const run3 = await createRun(db, { studyId: a.studyId, createdBy: a.leadId, file: file3 });
    const [r1, r2, r3] = a.raterIds;
    expect((await assignRaters(db, { runId: a.runId })).raterIds).toEqual([r1, r2]);
    expect((await assignRaters(db, { runId: run2 })).raterIds).toEqual([r3, r1]);
    // r1 submits run 1: now r2 and r3 have one open each, r1 has one open (run 2)
    await db('assignments')
      .where({ run_id: a.runId, rater_id: r1 })
      .update({ submitted_at: db.raw('NOW(3)') });
    await db('assignments')
      .where({ run_id: run2, rater_id: r1 })
      .update({ submitted_at: db.raw('NOW(3)') });
    expect((await assignRaters(db, { runId: run3 })).raterIds).toEqual([r1, r2]);
    expect(await assignRaters(db, { runId: run3 })).toMatchObject({ outcome: 'already_assigned', raterIds: [] });
  });

  it('says when the study has too few raters', async () => {
    const { runId } = await createPhantomRun(db, { raters: 1, raters_per_run: 3 });
    expect(await assignRaters(db, { runId })).toMatchObject({ outcome: 'assigned', wanted: 3, short: 2 });
  });
});

describe('worker processes', () => {
  it('two workers share the queue and never run the same job', async () => {
    const runs: number[] = [];
    for (let i = 0; i < 4; i++) {
      const { runId } = await createPhantomRun(db, { seed: 10 + i });
      await queueDecomposition(db, { runId });
      runs.push(runId);
    }
    const w1 = spawnWorker({ uploadsDir: uploads.dir });
    const w2 = spawnWorker({ uploadsDir: uploads.dir });
    const [e1, e2] = await Promise.all([w1.exited, w2.exited]);
    expect(e1.code, w1.lines.join('\n')).toBe(0);
    expect(e2.code, w2.lines.join('\n')).toBe(0);
    const started = [...w1.lines, ...w2.lines].filter((l) => / decompose started /.test(l)).map((l) => Number(/^job (\d+)/.exec(l)![1]));
    // every job started; a job may be started a second time only after its first attempt ended
    // (seen once in a loaded CI run, cause not yet known: the workers' lines are printed if it
    // goes wrong) — never two results: one decomposition per run, checked below
    const log = [...w1.lines, '---', ...w2.lines].join('\n');
    expect(new Set(started).size, log).toBe(4);
    expect(started.length, log).toBeLessThanOrEqual(5);
    expect(log).not.toMatch(/stopped \(lease lost or released\)/); // two workers on one attempt would show this
    for (const runId of runs) {
      expect((await db('runs').where({ id: runId }).first()).status).toBe('ready');
      expect(await currentDecompositions(runId)).toHaveLength(1);
    }
    expect(await db('jobs').whereNot({ status: 'succeeded' })).toHaveLength(0);
  });

  it('a worker killed with SIGKILL mid-job: after the lease expires another worker finishes it once', async () => {
    const { runId } = await createPhantomRun(db, { size: 'small' });
    const { jobId } = await queueDecomposition(db, { runId });
    const env = { QUORUM_JOB_LEASE_MS: '2000' };
    const victim = spawnWorker({ uploadsDir: uploads.dir, env });
    await waitFor(
      async () => {
        const j = await getJob(db, jobId);
        return j?.status === 'running' && j.leaseOwner === victim.workerId;
      },
      { everyMs: 10 },
    );
    victim.child.kill('SIGKILL');
    expect((await victim.exited).signal).toBe('SIGKILL');
    const stuck = await getJob(db, jobId);
    expect(stuck).toMatchObject({ status: 'running', leaseOwner: victim.workerId });

    const rescuer = spawnWorker({ uploadsDir: uploads.dir, env });
    expect((await rescuer.exited).code, rescuer.lines.join('\n')).toBe(0);
    const job = await getJob(db, jobId);
    expect(job).toMatchObject({ status: 'succeeded', attempts: 2 });
    expect(rescuer.lines.some((l) => /re-queued job/.test(l))).toBe(true);
    const current = await currentDecompositions(runId);
    expect(current).toHaveLength(1);
    expect(await db('decompositions').where({ run_id: runId })).toHaveLength(1);
    expect(await db('components').where({ decomposition_id: current[0].id }).count({ n: '*' }).first()).toEqual({ n: current[0].k });
    expect((await db('runs').where({ id: runId }).first()).status).toBe('ready');
  });

  it('a truncated run file ends failed after the attempts with its message; a cancelled queued job never runs', async () => {
    const bad = await createPhantomRun(db);
    const full = pathFor(bad.file.fileKey);
    await truncate(full, Math.floor((await stat(full)).size / 2));
    const badJob = await queueDecomposition(db, { runId: bad.runId, maxAttempts: 2 });
    const cancelled = await createPhantomRun(db);
    const cancelledJob = await queueDecomposition(db, { runId: cancelled.runId });
    expect(await cancelJob(db, cancelledJob.jobId)).toBe('cancelled');

    const w = spawnWorker({ uploadsDir: uploads.dir, env: { QUORUM_JOB_RETRY_BASE_MS: '0' } });
    expect((await w.exited).code, w.lines.join('\n')).toBe(0);
    const job = await getJob(db, badJob.jobId);
    expect(job).toMatchObject({ status: 'failed', attempts: 2 });
    expect(job!.message).toMatch(/^The run's file cannot be read: /);
    const run = await db('runs').where({ id: bad.runId }).first();
    expect(run).toMatchObject({ status: 'failed', status_message: job!.message });

    expect(w.lines.some((l) => l.startsWith(`job ${cancelledJob.jobId} `))).toBe(false);
    expect(await getJob(db, cancelledJob.jobId)).toMatchObject({ status: 'cancelled', attempts: 0 });
    expect((await db('runs').where({ id: cancelled.runId }).first()).status).toBe('cancelled');
  });

  it('SIGTERM releases the running job without counting the attempt', async () => {
    const { runId } = await createPhantomRun(db, { size: 'small' });
    const { jobId } = await queueDecomposition(db, { runId });
    const w = spawnWorker({ uploadsDir: uploads.dir, args: [] });
    await waitFor(async () => (await getJob(db, jobId))?.status === 'running', { everyMs: 10 });
    w.child.kill('SIGTERM');
    const exit = await w.exited;
    expect(exit.code, w.lines.join('\n')).toBe(0);
    const job = await getJob(db, jobId);
    if (process.env.QUORUM_TEST_DEBUG) console.log(w.lines.join('\n'));
    // either it was released in time (queued, attempt not counted) or it had already finished
    if (job!.status === 'queued') {
      expect(job).toMatchObject({ attempts: 0, leaseOwner: null });
      expect(w.lines.some((l) => /released back to the queue/.test(l))).toBe(true);
      expect(await db('decompositions').where({ run_id: runId })).toHaveLength(0);
      expect((await db('runs').where({ id: runId }).first()).status).toBe('queued');
    } else {
      expect(job!.status, w.lines.join('\n')).toBe('succeeded');
    }
    expect(existsSync(uploads.dir)).toBe(true);
  });
});
