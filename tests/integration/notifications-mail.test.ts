/**
 * Notification e-mails end to end on this machine: assignments made within the batch window reach
 * each rater as ONE e-mail (read back from the fake SMTP server's store), later assignments make a
 * new batch, the lead is told once when a run's votes are complete (with the pending count), and
 * the daily overdue summary lists late work and queues itself for the next day.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import net from 'node:net';
import { closeDb, db, toJson } from '@/lib/db/knex';
import { claimJob } from '@/lib/jobs';
import { jobKinds } from '@/lib/worker/kinds';
import { runClaimedJob } from '@/lib/worker/runner';
import { listMail, mailTo, type StoredMail } from '@/lib/mail/mailbox';
import { afterAssignmentsCreated, queueVotesCompleteCheck } from '@/lib/jobs/queue-notifications';
import { NOTIFY_ASSIGNMENTS, NOTIFY_OVERDUE, NOTIFY_VOTES_COMPLETE } from '@/lib/notifications/payloads';
import { assignRaters } from '@/lib/runs/assign-raters';
import { createStudyWithRaters, uniqueSuffix } from './helpers/factories';

const BATCH_MS = 300;
process.env.QUORUM_NOTIFY_BATCH_MS = String(BATCH_MS);
process.env.QUORUM_FACILITY_NAME = 'Fernhollow Imaging Core';
const quiet = { info() {}, warn() {}, error() {} };

let server: ChildProcess;
let dir: string;
let s: { leadId: number; studyId: number; raterIds: number[] };
const emails = new Map<number, string>();

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const srv = net.createServer().listen(0, '127.0.0.1', () => {
      const p = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(p));
    });
  });
}

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), 'quorum-notify-mail-'));
  const port = await freePort();
  server = spawn(process.execPath, ['--import', 'tsx', 'scripts/mail-server.ts'], {
    env: { ...process.env, QUORUM_MAIL_PORT: String(port), QUORUM_MAIL_DIR: dir },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  await new Promise<void>((resolve, reject) => {
    server.stdout!.on('data', (d: Buffer) => d.toString().includes('fake SMTP server') && resolve());
    server.on('exit', (code) => reject(new Error(`mail server exited with ${code}`)));
  });
  process.env.SMTP_PORT = String(port);
  await db('jobs').del();
  s = await createStudyWithRaters(db, { raters: 3, raters_per_run: 2 });
  for (const id of [s.leadId, ...s.raterIds]) emails.set(id, (await db('users').where({ id }).first('email')).email);
});

afterAll(async () => {
  server?.kill('SIGTERM');
  delete process.env.SMTP_PORT;
  await rm(dir, { recursive: true, force: true });
  await closeDb();
});

/** A ready run (assignment reads no file), with a current decomposition of k components when k > 0. */
async function readyRun(k = 0): Promise<{ runId: number; componentIds: number[] }> {
  const [runId] = await db('runs').insert({
    study_id: s.studyId,
    sub: `n${uniqueSuffix()}`,
    task: 'rest',
    original_name: 'x_bold.nii.gz',
    file_key: `runs/${uniqueSuffix()}.nii.gz`,
    sha256: `${uniqueSuffix()}${uniqueSuffix()}`.padEnd(64, '0'),
    size_bytes: 1,
    status: 'ready',
    created_by: s.leadId,
  });
  const componentIds: number[] = [];
  if (k) {
    const [d] = await db('decompositions').insert({ run_id: runId, parameters: toJson({}), k, is_current: true });
    for (let i = 1; i <= k; i++)
      componentIds.push(
        Number((await db('components').insert({ decomposition_id: d, idx: i, variance_explained: 0.1, features: toJson({}) }))[0]),
      );
  }
  return { runId: Number(runId), componentIds };
}

/** What the decompose job does when a run becomes ready: assign, then call the notification hook. */
async function runBecomesReady(k = 0) {
  const run = await readyRun(k);
  await db.transaction(async (trx) => {
    const r = await assignRaters(trx, { runId: run.runId });
    if (r.raterIds.length) await afterAssignmentsCreated(trx, { studyId: s.studyId });
  });
  return run;
}

const queued = (kind: string) => db('jobs').where({ kind, status: 'queued' }).select('id', 'run_after');

/** Makes the queued jobs of `kind` due now and runs them in this process. */
async function runDue(kind: string): Promise<string[]> {
  await db('jobs')
    .where({ kind, status: 'queued' })
    .update({ run_after: db.raw('NOW(3)') });
  const outcomes: string[] = [];
  for (;;) {
    const job = await claimJob(db, { workerId: 'notify-test', leaseMs: 10_000, kinds: [kind] });
    if (!job) return outcomes;
    outcomes.push(
      await runClaimedJob(db, job, { workerId: 'notify-test', leaseMs: 10_000, kinds: jobKinds, logger: quiet, retryBaseMs: 0 }),
    );
  }
}

/** Messages to this file's people (other test files' assignments in the same database may be mailed too). */
async function mine(): Promise<StoredMail[]> {
  const ours = new Set([...emails.values()].map((e) => e.toLowerCase()));
  return (await listMail({ dir })).filter((m) => m.to.some((t) => ours.has(t.toLowerCase())));
}

/** Waits until `n` messages to this file's people have arrived (the server writes each as it receives it). */
async function mailCount(n: number): Promise<StoredMail[]> {
  const deadline = Date.now() + 10_000;
  for (;;) {
    const all = await mine();
    if (all.length >= n || Date.now() > deadline) return all;
    await new Promise((r) => setTimeout(r, 100));
  }
}

const runsListed = (m: StoredMail) => (m.text.match(/\/runs\/\d+\/rate/g) ?? []).map((u) => Number(/\d+/.exec(u)![0]));

describe('assignment e-mails', () => {
  it('one e-mail per rater per batch, listing every run assigned in the window', async () => {
    const runs = [];
    for (let i = 0; i < 4; i++) runs.push(await runBecomesReady());
    expect(await queued(NOTIFY_ASSIGNMENTS)).toHaveLength(1); // one job for the whole batch
    const [job] = await queued(NOTIFY_ASSIGNMENTS);
    expect(new Date(job.run_after).getTime()).toBeGreaterThan(Date.now() - 5_000);
    expect(await queued(NOTIFY_VOTES_COMPLETE)).toHaveLength(1);
    expect(await queued(NOTIFY_OVERDUE)).toHaveLength(1);

    expect(await runDue(NOTIFY_ASSIGNMENTS)).toEqual(['succeeded']);
    await mailCount(3);
    for (const raterId of s.raterIds) {
      const mine = await db('assignments').where({ rater_id: raterId }).pluck('run_id');
      const got = await mailTo({ to: emails.get(raterId)!, dir });
      expect(got, `rater ${raterId}`).toHaveLength(mine.length ? 1 : 0);
      if (!mine.length) continue;
      expect(runsListed(got[0]!).sort()).toEqual(mine.map(Number).sort());
      expect(got[0]!.subject).toBe(`Fernhollow Imaging Core: ${mine.length} run${mine.length === 1 ? '' : 's'} to rate`);
      expect(got[0]!.html).toContain('Fernhollow Imaging Core');
      for (const body of [got[0]!.text, got[0]!.html!]) expect(body).not.toMatch(/password|token|sha256/i);
    }
    expect(
      await db('assignments')
        .whereIn(
          'run_id',
          runs.map((r) => r.runId),
        )
        .whereNull('notified_at'),
    ).toHaveLength(0);
    expect(await mailTo({ to: emails.get(s.leadId)!, dir })).toHaveLength(0);

    // nothing new: a second job sends nothing
    await db('jobs').insert({ kind: NOTIFY_ASSIGNMENTS, payload: '{}', status: 'queued', max_attempts: 1 });
    expect(await runDue(NOTIFY_ASSIGNMENTS)).toEqual(['succeeded']);
    expect(await mine()).toHaveLength(3);
  });

  it('a later assignment makes a new batch that lists only the new run', async () => {
    const before = (await mine()).length;
    const run = await runBecomesReady();
    expect(await runDue(NOTIFY_ASSIGNMENTS)).toEqual(['succeeded']);
    const all = await mailCount(before + 2);
    expect(all).toHaveLength(before + 2);
    const assigned = (await db('assignments').where({ run_id: run.runId }).pluck('rater_id')).map(Number);
    for (const raterId of assigned) {
      const [latest] = await mailTo({ to: emails.get(raterId)!, dir });
      expect(runsListed(latest!)).toEqual([run.runId]);
    }
  });
});

describe('the lead', () => {
  it('gets one e-mail when every assigned rater has submitted a run, with the pending decisions', async () => {
    const run = await runBecomesReady(3);
    await runDue(NOTIFY_ASSIGNMENTS);
    const raters = (await db('assignments').where({ run_id: run.runId }).pluck('rater_id')).map(Number);
    await db('decisions').insert(
      run.componentIds.map((c, i) => ({
        component_id: c,
        run_id: run.runId,
        method: i === 0 ? 'unanimous' : 'pending',
        label: i === 0 ? 'signal' : null,
      })),
    );
    const before = (await mine()).length;

    // one rater submitted: not complete yet
    await db('assignments')
      .where({ run_id: run.runId, rater_id: raters[0] })
      .update({ submitted_at: db.fn.now(3) });
    await queueVotesCompleteCheck(db);
    await runDue(NOTIFY_VOTES_COMPLETE);
    expect(await mailTo({ to: emails.get(s.leadId)!, dir })).toHaveLength(0);

    await db('assignments')
      .where({ run_id: run.runId, rater_id: raters[1] })
      .update({ submitted_at: db.fn.now(3) });
    await queueVotesCompleteCheck(db);
    expect(await queued(NOTIFY_VOTES_COMPLETE)).toHaveLength(1);
    expect(await runDue(NOTIFY_VOTES_COMPLETE)).toEqual(['succeeded']);
    await mailCount(before + 1);
    const got = await mailTo({ to: emails.get(s.leadId)!, dir });
    expect(got).toHaveLength(1);
    expect(got[0]!.subject).toMatch(/is rated — 2 decisions waiting$/);
    expect(got[0]!.text).toContain(`/studies/${s.studyId}/reconcile`);
    expect(got[0]!.text).toContain('All 2 assigned raters have submitted');

    // checked again: no second message; the check re-queued itself while ratings are open
    expect(await queued(NOTIFY_VOTES_COMPLETE)).toHaveLength(1);
    await runDue(NOTIFY_VOTES_COMPLETE);
    expect(await mailTo({ to: emails.get(s.leadId)!, dir })).toHaveLength(1);
    expect(await db('notifications').where({ user_id: s.leadId, kind: 'run.votes_complete' })).toHaveLength(1);
  });

  it('gets the daily overdue summary, and the job queues itself for the next day', async () => {
    const open = await db('assignments as a')
      .join('runs as r', 'r.id', 'a.run_id')
      .where('r.study_id', s.studyId)
      .whereNull('a.submitted_at')
      .first('a.id', 'a.rater_id', 'a.run_id');
    await db('assignments')
      .where({ id: open.id })
      .update({ due_at: new Date(Date.now() - 86_400_000) });
    const before = (await mine()).length;
    expect(await runDue(NOTIFY_OVERDUE)).toEqual(['succeeded']);
    await mailCount(before + 1);
    const [summary] = await mailTo({ to: emails.get(s.leadId)!, dir });
    expect(summary!.subject).toBe('Fernhollow Imaging Core: 1 overdue assignment');
    const rater = await db('users').where({ id: open.rater_id }).first('name');
    expect(summary!.text).toContain(rater.name);
    expect(summary!.text).toContain(`/studies/${s.studyId}/assignments`);
    const next = await queued(NOTIFY_OVERDUE);
    expect(next).toHaveLength(1);
    expect(new Date(next[0].run_after).getTime()).toBeGreaterThan(Date.now());
    expect(new Date(next[0].run_after).getTime()).toBeLessThanOrEqual(Date.now() + 86_400_000 + 5_000);
  });
});
