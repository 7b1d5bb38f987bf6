/**
 * Periodic re-calibration and the named calibration set (real MariaDB, issue 16). A lead names the
 * set and sets "every 4 weeks"; the `recalibrate` job gives the set again to certified raters whose
 * last pass is at least 4 weeks old — once (a second run, or two at the same time, assign nothing
 * more) — keeping the finished round's score; the rater's queue shows the reopened run; a second
 * round that drops below the threshold shows in the history (oldest first) and e-mails the lead.
 * Scores are hand-computable (6 components, reference noise ×3 / signal ×3): all correct gives AC1 1
 * and noise sensitivity 3/3 = 1; all "signal" gives noise sensitivity 0/3 = 0 (TP / (TP + FN)).
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';
import { startMailCatcher } from './helpers/mail-catcher';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb, toJson } = await import('@/lib/db/knex');
const { createStudyWithRaters, uniqueSuffix } = await import('./helpers/factories');
const { dueRecalibrations, calibrationRounds } = await import('@/lib/db/queries/calibration-rounds');
const { assignDueRecalibrations } = await import('@/lib/calibration/assign-recalibrations');
const { listQueueForRater } = await import('@/lib/db/queries/work-queue');
const { calibrationGate } = await import('@/lib/db/queries/calibration-gate');
const { sendDriftNotices } = await import('@/lib/notifications/calibration-drift');
const { listMail } = await import('@/lib/mail/mailbox');
const { claimJob } = await import('@/lib/jobs');
const { jobKinds } = await import('@/lib/worker/kinds');
const { runClaimedJob } = await import('@/lib/worker/runner');
const thresholdRoute = await import('@/app/api/studies/[id]/calibration/threshold/route');
const certRoute = await import('@/app/api/studies/[id]/calibration/certifications/route');

const REFERENCE = ['noise', 'noise', 'noise', 'signal', 'signal', 'signal'];
const WEEK = 7 * 24 * 3600 * 1000;
const NOW = new Date();
let s: { leadId: number; studyId: number; raterIds: number[] };
let cal: { runId: number; ids: number[] };
let mailDir: string;
let mail: ChildProcess;

async function calibrationRun() {
  const [runId] = await db('runs').insert({
    study_id: s.studyId,
    sub: `r${uniqueSuffix()}`,
    task: 'rest',
    original_name: 'x_bold.nii.gz',
    file_key: `runs/${uniqueSuffix()}.nii.gz`,
    sha256: `${uniqueSuffix()}`.padEnd(64, '0'),
    size_bytes: 1,
    status: 'ready',
    is_calibration: true,
    created_by: s.leadId,
  });
  const [d] = await db('decompositions').insert({ run_id: runId, parameters: toJson({}), k: REFERENCE.length, is_current: true });
  const ids: number[] = [];
  for (const [i, label] of REFERENCE.entries()) {
    const [id] = await db('components').insert({ decomposition_id: d, idx: i + 1, variance_explained: 0.1, features: toJson({}) });
    ids.push(Number(id));
    await db('reference_labels').insert({ component_id: id, label, set_by: s.leadId });
  }
  return { runId: Number(runId), ids };
}

/** The rater's votes on the calibration run, submitted at `at` (as the desk's submit leaves them). */
async function rate(rater: number, labels: string[], at: Date) {
  for (const [i, id] of cal.ids.entries()) {
    await db('votes')
      .insert({ component_id: id, run_id: cal.runId, rater_id: rater, label: labels[i] })
      .onConflict(['component_id', 'rater_id'])
      .merge(['label']);
  }
  const a = await db('assignments').where({ run_id: cal.runId, rater_id: rater }).first('id');
  if (a) await db('assignments').where({ id: a.id }).update({ submitted_at: at, first_submitted_at: at });
  else await db('assignments').insert({ run_id: cal.runId, rater_id: rater, submitted_at: at, first_submitted_at: at });
}

beforeAll(async () => {
  mailDir = await mkdtemp(path.join(tmpdir(), 'quorum-recal-mail-'));
  const m = await startMailCatcher(mailDir);
  mail = m.server;
  process.env.SMTP_PORT = String(m.port);
  process.env.QUORUM_MAIL_DIR = mailDir;
  s = await createStudyWithRaters(db, { raters: 3 });
  cal = await calibrationRun();
  const [due, recent, uncertified] = s.raterIds as [number, number, number];
  await rate(due, REFERENCE, new Date(NOW.getTime() - 5 * WEEK));
  await rate(recent, REFERENCE, new Date(NOW.getTime() - 2 * WEEK));
  await rate(uncertified, REFERENCE, new Date(NOW.getTime() - 9 * WEEK));
  for (const id of [due, recent])
    await db('rater_certifications').insert({
      study_id: s.studyId,
      user_id: id,
      passed: true,
      certified_by: s.leadId,
      certified_at: db.fn.now(3),
    });
});

afterAll(async () => {
  mail?.kill('SIGTERM');
  delete process.env.SMTP_PORT;
  await rm(mailDir, { recursive: true, force: true });
  await closeDb();
});

describe('the named set and the re-calibration interval (PUT calibration/threshold)', () => {
  it('refuses a bad interval or a too long name with field messages, and only a lead may set them', async () => {
    actAs(s.leadId);
    const put = (body: unknown) => callRoute(thresholdRoute.PUT, { method: 'PUT', url: '/', params: { id: String(s.studyId) }, body });
    const zero = await put({ minAc1: 0.8, minSensitivity: 0.85, recalibrationWeeks: 0 });
    expect(zero.status).toBe(422);
    expect(zero.json.error.fields.recalibrationWeeks[0]).toMatch(/at least every week/);
    const long = await put({ minAc1: 0.8, minSensitivity: 0.85, setName: 'x'.repeat(81) });
    expect(long.status).toBe(422);
    expect(long.json.error.fields.setName[0]).toMatch(/at most 80 characters/);
    actAs(s.raterIds[0]!);
    expect((await put({ minAc1: 0.8, minSensitivity: 0.85, recalibrationWeeks: 4 })).status).toBe(403);
  });

  it('stores the name and "every 4 weeks", queues the daily check, and the gate names the set', async () => {
    actAs(s.leadId);
    const res = await callRoute(thresholdRoute.PUT, {
      method: 'PUT',
      url: '/',
      params: { id: String(s.studyId) },
      body: { minAc1: 0.8, minSensitivity: 0.85, setName: '  Autumn reference set ', recalibrationWeeks: 4 },
    });
    expect(res.status).toBe(200);
    expect(res.json).toEqual({ minAc1: 0.8, minSensitivity: 0.85, setName: 'Autumn reference set', recalibrationWeeks: 4 });
    expect(await db('jobs').where({ kind: 'recalibrate', status: 'queued' }).count({ n: '*' }).first()).toEqual({ n: 1 });
    const newcomer = s.raterIds[2]!;
    // a rater who has not submitted on the set is told which set
    await db('assignments').where({ run_id: cal.runId, rater_id: newcomer }).update({ submitted_at: null });
    expect((await calibrationGate({ studyId: s.studyId, raterId: newcomer })).reason).toBe(
      'has not submitted a run of the calibration set “Autumn reference set” yet',
    );
    await db('assignments')
      .where({ run_id: cal.runId, rater_id: newcomer })
      .update({ submitted_at: new Date(NOW.getTime() - 9 * WEEK) });
  });
});

describe('re-calibration every N weeks', () => {
  it('is due for a certified rater whose last pass is ≥ 4 weeks old; not for a recent one nor an uncertified one', async () => {
    const due = await dueRecalibrations({ now: NOW });
    expect(due.filter((d) => d.studyId === s.studyId).map((d) => d.raterId)).toEqual([s.raterIds[0]]);
    // exactly at 4 weeks it is due; a minute before, not
    const at = (await db('assignments').where({ run_id: cal.runId, rater_id: s.raterIds[0] }).first('submitted_at')).submitted_at as Date;
    expect((await dueRecalibrations({ now: new Date(at.getTime() + 4 * WEEK) })).some((d) => d.raterId === s.raterIds[0])).toBe(true);
    expect((await dueRecalibrations({ now: new Date(at.getTime() + 4 * WEEK - 60_000) })).some((d) => d.raterId === s.raterIds[0])).toBe(
      false,
    );
  });

  it('assigns the set again once: the finished round is kept, the votes cleared, the run back in the rater’s queue', async () => {
    const [due] = s.raterIds as [number];
    const before = await db('votes')
      .where({ run_id: cal.runId, rater_id: due })
      .orderBy('component_id')
      .select('component_id as componentId', 'label', 'noise_kind as noiseKind');
    expect(before.length).toBeGreaterThan(0);
    const first = await assignDueRecalibrations(db, { now: NOW });
    expect(first.started.filter((x) => x.studyId === s.studyId)).toEqual([
      { studyId: s.studyId, raterId: due, round: 2, runIds: [cal.runId] },
    ]);
    const a = await db('assignments').where({ run_id: cal.runId, rater_id: due }).select('submitted_at', 'due_at');
    expect(a).toHaveLength(1);
    expect(a[0].submitted_at).toBeNull();
    expect(new Date(a[0].due_at).getTime() - NOW.getTime()).toBe(14 * 24 * 3600 * 1000);
    expect(await db('votes').where({ run_id: cal.runId, rater_id: due }).count({ n: '*' }).first()).toEqual({ n: 0 });
    const rounds = await db('calibration_rounds')
      .where({ study_id: s.studyId, rater_id: due })
      .select('round', 'set_name', 'components', 'ac1', 'sensitivity');
    expect(rounds).toEqual([{ round: 1, set_name: 'Autumn reference set', components: 6, ac1: 1, sensitivity: 1 }]);
    // the cleared votes are kept with the round: nothing a rater saved is lost
    const kept = await db('calibration_rounds').where({ study_id: s.studyId, rater_id: due, round: 1 }).first('votes');
    const keptVotes = (typeof kept.votes === 'string' ? JSON.parse(kept.votes) : kept.votes) as Array<{
      componentId: number;
      label: string;
      noiseKind: string | null;
    }>;
    expect(keptVotes.map(({ componentId, label, noiseKind }) => ({ componentId, label, noiseKind }))).toEqual(before);
    // while the new round is open, the finished one still stands: no loss of live work
    expect(await calibrationGate({ studyId: s.studyId, raterId: due })).toEqual({ gated: true, passes: true, reason: null });
    const queue = await listQueueForRater({ raterId: due });
    expect(queue.filter((q) => q.runId === cal.runId).map((q) => ({ cal: q.isCalibration, submitted: q.submittedAt }))).toEqual([
      { cal: true, submitted: null },
    ]);
    const audit = await db('audit_log').where({ study_id: s.studyId, action: 'calibration.recalibration_assigned' }).select('target_id');
    expect(audit.map((x) => Number(x.target_id))).toEqual([due]);

    // idempotent: again now, and again far later while the round is open — nothing more
    expect((await assignDueRecalibrations(db, { now: NOW })).started.filter((x) => x.studyId === s.studyId)).toEqual([]);
    expect((await dueRecalibrations({ now: new Date(NOW.getTime() + 20 * WEEK) })).some((d) => d.raterId === due)).toBe(false);
    expect(await db('calibration_rounds').where({ study_id: s.studyId, rater_id: due }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  it('two checks at the same time start one round, not two', async () => {
    const recent = s.raterIds[1]!;
    const later = new Date(NOW.getTime() + 3 * WEEK);
    const [x, y] = await Promise.all([assignDueRecalibrations(db, { now: later }), assignDueRecalibrations(db, { now: later })]);
    const mine = [...x.started, ...y.started].filter((r) => r.studyId === s.studyId);
    expect(mine.map((r) => r.raterId)).toEqual([recent]);
    expect(await db('calibration_rounds').where({ study_id: s.studyId, rater_id: recent }).count({ n: '*' }).first()).toEqual({ n: 1 });
    expect(await db('assignments').where({ run_id: cal.runId, rater_id: recent }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  it('a second round below the threshold shows in the history after the first, and e-mails the lead', async () => {
    const [due] = s.raterIds as [number];
    await rate(
      due,
      REFERENCE.map(() => 'signal'),
      new Date(NOW.getTime() + 60_000),
    );
    const h = await calibrationRounds({ studyId: s.studyId, userId: due });
    expect(h.map((r) => ({ round: r.round, closed: r.closed, ac1: r.ac1, sensitivity: r.sensitivity, components: r.components }))).toEqual([
      { round: 1, closed: true, ac1: 1, sensitivity: 1, components: 6 },
      { round: 2, closed: false, ac1: expect.any(Number), sensitivity: 0, components: 6 },
    ]);
    expect(h[0]!.submittedAt < h[1]!.submittedAt).toBe(true);
    const gate = await calibrationGate({ studyId: s.studyId, raterId: due });
    expect(gate.reason).toContain('noise sensitivity 0.00 is below 0.85 on the calibration set “Autumn reference set”');
    const sent = await sendDriftNotices(db);
    expect(sent.sent.filter((x) => x.raterId === due)).toEqual([{ leadId: s.leadId, raterId: due }]);
    const lead = await db('users').where({ id: s.leadId }).first('email');
    const msgs = (await listMail({ dir: mailDir })).filter((m) => m.to.includes(lead.email));
    expect(msgs).toHaveLength(1);
    expect(msgs[0]!.text).toMatch(/noise sensitivity 0\.00 is below 0\.85/);
  });

  it('the recalibrate job runs in the worker and queues itself for the next day', async () => {
    await db('jobs')
      .where({ kind: 'recalibrate', status: 'queued' })
      .update({ run_after: db.fn.now(3) });
    const quiet = { info() {}, warn() {}, error() {} };
    const job = await claimJob(db, { workerId: 'inproc', leaseMs: 60_000, kinds: ['recalibrate'] });
    expect(job?.kind).toBe('recalibrate');
    expect(await runClaimedJob(db, job!, { workerId: 'inproc', leaseMs: 60_000, kinds: jobKinds, logger: quiet, retryBaseMs: 0 })).toBe(
      'succeeded',
    );
    const next = await db('jobs').where({ kind: 'recalibrate', status: 'queued' }).select('id', 'run_after');
    expect(next).toHaveLength(1);
    expect(new Date(next[0].run_after).getTime()).toBeGreaterThan(Date.now());
  });

  it('a certification in a study with an interval queues the daily check again when it was cancelled', async () => {
    await db('jobs').where({ kind: 'recalibrate', status: 'queued' }).update({ status: 'cancelled' });
    actAs(s.leadId);
    const res = await callRoute(certRoute.POST, {
      method: 'POST',
      url: '/',
      params: { id: String(s.studyId) },
      body: { userId: s.raterIds[0], passed: true },
    });
    expect(res.status, JSON.stringify(res.json)).toBe(200);
    expect(await db('jobs').where({ kind: 'recalibrate', status: 'queued' }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });
});
