/**
 * Issue 13 item 10, storage faults: with the storage root on a real, full file system an upload is
 * answered 507 with a clear message (no ENOSPC text, nothing kept), on a read-only one a
 * decomposition's results fail with a message for people (no EROFS text, no path); both leave a
 * storage.fault entry that the Facility page shows as an alert. The file systems are small tmpfs
 * mounts, so this file needs root (it says so and skips otherwise).
 */
import { execFileSync } from 'node:child_process';
import { mkdtemp, readdir, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const mountPoint = await mkdtemp(path.join(os.tmpdir(), 'quorum-storage-fault-'));
function tryMount(size: string): boolean {
  try {
    execFileSync('mount', ['-t', 'tmpfs', '-o', `size=${size}`, 'tmpfs', mountPoint], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}
const mounted = process.getuid?.() === 0 && tryMount('64k');
if (!mounted) console.warn('storage-faults.test.ts: skipped — mounting a small tmpfs needs root');
process.env.QUORUM_UPLOADS_DIR = mountPoint;

const { db, closeDb, parseJson } = await import('@/lib/db/knex');
const { recentStorageFaults } = await import('@/lib/db/queries/storage-use');
const { createStudyWithRaters, writePhantomRunFile, createRun } = await import('./helpers/factories');
const { queueDecomposition } = await import('@/lib/runs/queue-job');
const { claimJob, getJob } = await import('@/lib/jobs');
const { jobKinds } = await import('@/lib/worker/kinds');
const { runClaimedJob } = await import('@/lib/worker/runner');
const runsRoute = await import('@/app/api/studies/[id]/runs/route');
const { encodeNifti1 } = await import('@/lib/nifti');
const { generatePhantom, phantomToNiftiInput } = await import('@/lib/phantom');

afterAll(async () => {
  if (mounted) execFileSync('umount', [mountPoint]);
  await rm(mountPoint, { recursive: true, force: true });
  await closeDb();
});

async function faultsSince(id: number) {
  return db('audit_log').where({ action: 'storage.fault' }).where('id', '>', id).select('detail');
}
/** Waits until the alert row exists (it is written after the answer, best effort). */
async function waitForFault(sinceId: number) {
  for (;;) {
    const rows = await faultsSince(sinceId);
    if (rows.length) return rows;
    await new Promise((r) => setTimeout(r, 20));
  }
}
const lastAuditId = async () => Number((await db('audit_log').max({ m: 'id' }))[0].m ?? 0);

describe.skipIf(!mounted)('storage faults', () => {
  let study: Awaited<ReturnType<typeof createStudyWithRaters>>;
  beforeAll(async () => {
    study = await createStudyWithRaters(db, {});
  });

  it('a full disk answers an upload 507 with a clear message, keeps nothing, and alerts the admin', async () => {
    const since = await lastAuditId();
    actAs(study.leadId);
    // a real, valid uncompressed run, larger than the 64 KiB file system holds
    const bytes = encodeNifti1(phantomToNiftiInput(generatePhantom({ size: 'tiny', seed: 3 })));
    expect(bytes.length).toBeGreaterThan(256 * 1024);
    const req = new Request(`http://localhost/api/studies/${study.studyId}/runs?name=sub-01_task-rest_bold.nii&sub=01`, {
      method: 'POST',
      body: Buffer.from(bytes),
      headers: { 'content-type': 'application/octet-stream' },
    });
    const res = await runsRoute.POST(req, { params: Promise.resolve({ id: String(study.studyId) }) });
    const text = await res.text();
    expect(res.status, text).toBe(507);
    expect(JSON.parse(text).error.message).toMatch(/storage is full, so nothing was saved.*admin has been alerted/);
    expect(text).not.toMatch(/ENOSPC|\/tmp\//);
    const rows = await waitForFault(since);
    expect(parseJson(rows[0].detail)).toMatchObject({ kind: 'full', code: 'ENOSPC' });
    expect((await recentStorageFaults()).find((f) => f.kind === 'full')?.count).toBeGreaterThanOrEqual(1);
    expect((await readdir(path.join(mountPoint, 'tmp'), { recursive: true })).filter((f) => f.endsWith('.part'))).toEqual([]);
    expect(
      await db('runs')
        .where({ study_id: study.studyId })
        .count({ n: '*' })
        .then((r) => Number(r[0].n)),
    ).toBe(0);
  });

  it("a read-only storage fails a decomposition's results with a message for people and alerts the admin", async () => {
    execFileSync('umount', [mountPoint]);
    execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=32m', 'tmpfs', mountPoint]);
    const file = await writePhantomRunFile({ size: 'tiny', seed: 2 });
    const runId = await createRun(db, { studyId: study.studyId, createdBy: study.leadId, file });
    execFileSync('mount', ['-o', 'remount,ro', mountPoint]);
    const since = await lastAuditId();
    const { jobId } = await queueDecomposition(db, { runId, maxAttempts: 1 });
    // jobs other test files left queued wait until this one is claimed
    await db('jobs')
      .where({ status: 'queued' })
      .whereNot({ id: jobId })
      .update({ run_after: db.raw('NOW(3) + INTERVAL 1 DAY') });
    const job = await claimJob(db, { workerId: 'fault-test', leaseMs: 30_000, kinds: Object.keys(jobKinds) });
    expect(job?.id).toBe(jobId);
    const quiet = { info() {}, warn() {}, error() {} };
    expect(await runClaimedJob(db, job!, { workerId: 'fault-test', leaseMs: 30_000, kinds: jobKinds, logger: quiet, retryBaseMs: 0 })).toBe(
      'failed',
    );
    const failed = await getJob(db, jobId);
    expect(failed!.message).toBe(
      "The results could not be written: the facility's storage refused the write (read-only or permission denied). The facility admin has been alerted.",
    );
    expect((await db('runs').where({ id: runId }).first('status_message')).status_message).not.toMatch(/EROFS|EPERM|\//);
    const rows = await faultsSince(since);
    // a read-only tmpfs answers mkdir -p with EROFS or ENOENT, depending on the kernel: either is a fault
    expect(parseJson(rows[0].detail)).toMatchObject({ kind: 'denied' });
    expect(await readdir(mountPoint)).toEqual(['runs']); // no half-written decomposition folder
  });
});
