/**
 * Drift e-mail (real MariaDB, the fake SMTP server of scripts/mail-server.ts): a certified rater whose
 * score over their submitted calibration runs drops below the study's threshold is reported to the
 * lead by e-mail, once per calibration submission; a rater who stays above it is not.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import net from 'node:net';
import { closeDb, db, toJson } from '@/lib/db/knex';
import { listMail } from '@/lib/mail/mailbox';
import { sendDriftNotices } from '@/lib/notifications/calibration-drift';
import { createStudyWithRaters, uniqueSuffix } from './helpers/factories';

let server: ChildProcess;
let dir: string;
let s: { leadId: number; studyId: number; raterIds: number[] };
const REFERENCE = ['noise', 'noise', 'noise', 'signal', 'signal', 'signal'];

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const srv = net.createServer().listen(0, '127.0.0.1', () => {
      const p = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(p));
    });
  });
}

/** A submitted calibration run with reference REFERENCE; each rater votes `labels[rater]`. */
async function calibrationRun(votes: Array<[number, string[]]>) {
  const [runId] = await db('runs').insert({
    study_id: s.studyId,
    sub: `d${uniqueSuffix()}`,
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
  for (const [rater, labels] of votes) {
    await db('assignments').insert({ run_id: runId, rater_id: rater, submitted_at: db.fn.now(3) });
    for (const [i, id] of ids.entries()) await db('votes').insert({ component_id: id, run_id: runId, rater_id: rater, label: labels[i] });
  }
}

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), 'quorum-drift-mail-'));
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
  process.env.QUORUM_MAIL_DIR = dir;
  s = await createStudyWithRaters(db, { raters: 2 });
  await db('studies').where({ id: s.studyId }).update({ calibration_min_ac1: 0.8, calibration_min_sensitivity: 0.85 });
  for (const id of s.raterIds)
    await db('rater_certifications').insert({
      study_id: s.studyId,
      user_id: id,
      passed: true,
      certified_by: s.leadId,
      certified_at: db.fn.now(3),
    });
  // both raters start perfect
  await calibrationRun(s.raterIds.map((r) => [r, REFERENCE]));
});

afterAll(async () => {
  server?.kill('SIGTERM');
  delete process.env.SMTP_PORT;
  await rm(dir, { recursive: true, force: true });
  await closeDb();
});

describe('calibration drift e-mail', () => {
  it('sends nothing while every certified rater is above the threshold', async () => {
    expect((await sendDriftNotices(db)).sent).toEqual([]);
  });

  it('a drop below the threshold e-mails the lead once, naming the rater and the statistic', async () => {
    const [good, drifting] = s.raterIds as [number, number];
    // the re-calibration: rater 2 now calls every component signal; pooled noise sensitivity 3/6 = 0.5 < 0.85
    await calibrationRun([
      [good, REFERENCE],
      [drifting, REFERENCE.map(() => 'signal')],
    ]);
    const first = await sendDriftNotices(db);
    expect(first.sent).toEqual([{ leadId: s.leadId, raterId: drifting }]);
    const lead = await db('users').where({ id: s.leadId }).first('email');
    const rater = await db('users').where({ id: drifting }).first('name');
    const mail = (await listMail({ dir })).filter((m) => m.to.includes(lead.email));
    expect(mail).toHaveLength(1);
    expect(mail[0]!.subject).toContain(rater.name);
    expect(mail[0]!.text).toMatch(/noise sensitivity 0\.50 is below 0\.85/);
    expect((await sendDriftNotices(db)).sent).toEqual([]);
  });

  it('the rater’s history shows the drop run by run (1.00 then 0.00 noise sensitivity)', async () => {
    const { calibrationHistory } = await import('@/lib/db/queries/calibration');
    const h = await calibrationHistory({ studyId: s.studyId, userId: s.raterIds[1]! });
    expect(h.map((e) => e.score.noise.sensitivity.value)).toEqual([1, 0]);
  });
});
