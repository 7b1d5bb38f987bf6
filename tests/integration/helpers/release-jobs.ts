/**
 * Runs queued `release` jobs in the test's process with the real job kind and runner, as
 * `npm run worker` does for them (claim, run, complete in one transaction), until none is left.
 */
import type { Knex } from 'knex';
import { parseJson } from '@/lib/db/knex';
import { claimJob } from '@/lib/jobs/queue';
import { runClaimedJob, type RunOutcome } from '@/lib/worker/runner';
import { jobKinds } from '@/lib/worker/kinds';

const logger = { info: () => {}, warn: () => {}, error: (m: string) => console.error(m) };

export async function runReleaseJobs(db: Knex): Promise<{ jobId: number; outcome: RunOutcome }[]> {
  const done: { jobId: number; outcome: RunOutcome }[] = [];
  for (;;) {
    const job = await claimJob(db, { workerId: 'test-release-worker', kinds: ['release'], leaseMs: 60_000 });
    if (!job) return done;
    done.push({
      jobId: job.id,
      outcome: await runClaimedJob(db, job, { workerId: 'test-release-worker', leaseMs: 60_000, kinds: jobKinds, logger }),
    });
  }
}

/**
 * After a release request answered 202: runs the release jobs, then returns the request's answer
 * with the job's end state and, when it succeeded, its { releaseId, version, files }.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- the route answers' JSON, as callRoute gives it
export async function buildRequestedRelease<R extends { status: number; json: any }>(db: Knex, res: R): Promise<R> {
  if (res.status !== 202) return res;
  await runReleaseJobs(db);
  const job = await db('jobs').where({ id: res.json.jobId }).first('status', 'message', 'result');
  return {
    ...res,
    json: { ...res.json, jobStatus: job?.status, jobMessage: job?.message, ...(parseJson<object>(job?.result, null) ?? {}) },
  };
}
