/**
 * A lead reopens a rater's submitted run: the rater is told by e-mail (lib/assignments/
 * reopen-assignment.ts queues it in the reopening's transaction; the worker's send-mail job sends it
 * through the local mail catcher). The mail names the run, the lead and the reason and links to the
 * rating desk. A deactivated rater gets none; a refused reopening queues none. While a reopened
 * rater has not submitted again, the run cannot be released (their votes may still change).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { ChildProcess } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-reopen-mail-'));
process.env.QUORUM_UPLOADS_DIR = uploads;
process.env.QUORUM_NOTIFY_BATCH_MS = '0'; // notifications on under NODE_ENV=test (lib/notifications/config.ts)
process.env.QUORUM_PUBLIC_URL = 'http://quorum.test';

const { db, closeDb } = await import('@/lib/db/knex');
const { claimJob } = await import('@/lib/jobs');
const { jobKinds } = await import('@/lib/worker/kinds');
const { runClaimedJob } = await import('@/lib/worker/runner');
const { waitForMail } = await import('@/lib/mail/mailbox');
const { SEND_MAIL } = await import('@/lib/mail/payloads');
const { createStudyWithRaters } = await import('./helpers/factories');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const { startMailCatcher } = await import('./helpers/mail-catcher');
const reopenRoute = await import('@/app/api/runs/[id]/assignments/[raterId]/reopen/route');
const { releaseReadiness } = await import('@/lib/db/queries/releases');
const { refusalOf, requestRelease } = await import('@/lib/releases/create-release');

let server: ChildProcess;
let mailDir: string;
let leadId: number;
let studyId: number;
let raters: number[];
let run: Awaited<ReturnType<typeof createReadyRun>>;
const quiet = { info() {}, warn() {}, error() {} };

beforeAll(async () => {
  mailDir = await mkdtemp(path.join(os.tmpdir(), 'quorum-reopen-mailbox-'));
  let port: number;
  ({ port, server } = await startMailCatcher(mailDir));
  process.env.SMTP_PORT = String(port);
  const s = await createStudyWithRaters(db, { raters: 2, raters_per_run: 2 });
  leadId = s.leadId;
  studyId = s.studyId;
  raters = s.raterIds;
  run = await createReadyRun(db, { studyId: s.studyId, createdBy: leadId, raterIds: raters, seed: 41, components: 4, sub: 'reopenmail' });
  await db('assignments')
    .where({ run_id: run.runId })
    .update({ submitted_at: db.fn.now(3), first_submitted_at: db.fn.now(3) });
});
afterAll(async () => {
  server?.kill('SIGTERM');
  for (const name of ['QUORUM_NOTIFY_BATCH_MS', 'QUORUM_PUBLIC_URL', 'SMTP_PORT']) delete process.env[name];
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
  await rm(mailDir, { recursive: true, force: true });
});

const reopen = (raterId: number, reason: string) => {
  actAs(leadId);
  return callRoute(reopenRoute.POST, {
    method: 'POST',
    url: `/api/runs/${run.runId}/assignments/${raterId}/reopen`,
    params: { id: String(run.runId), raterId: String(raterId) },
    body: { reason },
  });
};
const outboxFor = async (raterId: number) => {
  const { email } = await db('users').where({ id: raterId }).first('email');
  return {
    email: String(email),
    rows: await db('mail_outbox').where({ to_email: email, template: 'run-reopened' }).select('id', 'subject', 'text_body as text'),
  };
};

describe('reopening a submitted run', () => {
  it('queues an e-mail to the rater in the same transaction; the worker sends it with the reason and the link', async () => {
    const res = await reopen(raters[0], 'Component 3 looks like a vessel after all; please look again.');
    expect(res.status).toBe(200);
    const { email, rows } = await outboxFor(raters[0]);
    expect(rows).toHaveLength(1);
    const job = await db('jobs').where({ kind: SEND_MAIL }).whereRaw("JSON_VALUE(payload, '$.outboxId') = ?", [rows[0].id]).first('id');
    expect(job, 'a send-mail job for the outbox row').toBeTruthy();
    await db('jobs')
      .where({ id: job.id })
      .update({ run_after: db.raw('NOW(3)') });
    // as the worker does: send-mail jobs in queue order (earlier test files may have left some) until ours ran
    for (let claimed; (claimed = await claimJob(db, { workerId: 'reopen-mail-test', leaseMs: 10_000, kinds: [SEND_MAIL] }));) {
      await runClaimedJob(db, claimed, { workerId: 'reopen-mail-test', leaseMs: 10_000, kinds: jobKinds, logger: quiet, retryBaseMs: 0 });
      if (claimed.id === Number(job.id)) break;
    }
    expect((await db('jobs').where({ id: job.id }).first('status')).status).toBe('succeeded');

    const mail = await waitForMail({ to: email, dir: mailDir, subject: /is open for you again/ });
    expect(mail.text).toContain('Component 3 looks like a vessel after all; please look again.');
    expect(mail.text).toContain(`http://quorum.test/runs/${run.runId}/rate`);
    expect(mail.text).toMatch(/reopened sub-reopenmail/);
  });

  it('a refused reopening (not submitted any more) queues nothing; a deactivated rater gets no e-mail', async () => {
    expect((await reopen(raters[0], 'Again, please.')).status).toBe(409);
    expect((await outboxFor(raters[0])).rows).toHaveLength(1);

    await db('users').where({ id: raters[1] }).update({ active: false });
    expect((await reopen(raters[1], 'One more look at the motion components.')).status).toBe(200);
    expect((await outboxFor(raters[1])).rows).toHaveLength(0);
  });

  it('a run reopened for a rater who has not submitted again cannot be released; once they submit, that reason is gone', async () => {
    const refusal = () => releaseReadiness({ studyId, runId: run.runId }).then((r) => refusalOf(r, studyId));
    // every component decided by the lead, so only the reopening stands in the way
    await db('decisions').where({ run_id: run.runId }).delete();
    await db('decisions').insert(
      run.componentIds.map((c) => ({
        component_id: c,
        run_id: run.runId,
        label: 'signal',
        method: 'override',
        decided_by: leadId,
        decided_at: db.fn.now(3),
      })),
    );
    expect(await refusal()).toMatch(/reopened runs for .*\(run \d+\), .*\(run \d+\), who have not submitted again/);
    const lead = await db('users').where({ id: leadId }).first('id', 'role', 'name');
    await expect(requestRelease({ user: lead, studyId, runId: run.runId })).rejects.toMatchObject({
      code: 'conflict',
      message: expect.stringMatching(/Release once they have submitted/),
    });

    await db('assignments')
      .where({ run_id: run.runId })
      .update({ submitted_at: db.fn.now(3) });
    expect(await refusal()).toBeNull();
  });
});
