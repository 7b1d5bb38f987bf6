/**
 * Who may do what with a study's runs, against the real MariaDB: the permission matrix and the
 * WHERE-scoped queries together. A rater cannot upload and sees only the runs assigned to them;
 * an observer reads but changes nothing; a lead of another study can neither see nor upload;
 * run actions (cancel, retry, delete with the second confirmation and its audit entry).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { db } from '@/lib/db/knex';
import { AppError } from '@/lib/errors';
import { can } from '@/lib/auth/permissions';
import { studyWithAccess } from '@/lib/studies/study-with-access';
import { createStudy } from '@/lib/studies/create-study';
import { updateStudy } from '@/lib/studies/update-study';
import { addMember } from '@/lib/members/add-member';
import { removeMember } from '@/lib/members/remove-member';
import { studyProgress } from '@/lib/db/queries/runs';
import { listRunsForStudy } from '@/lib/runs/list-study-runs';
import { STUDY_DEFAULTS, studySchema } from '@/lib/studies/schema';
import { uploadRun } from '@/lib/runs/upload';
import { cancelRun, deleteRun, queueRun, retryRun } from '@/lib/runs/actions';
import { runUploadQuerySchema } from '@/lib/runs/schema';
import { createUser, useTempUploads } from './helpers/factories';
import type { RawBody } from '@/lib/runs/upload';

/** The bytes as a streamed request body with Content-Length. */
function rawBody(bytes: Uint8Array): RawBody {
  let sent = false;
  const body = new ReadableStream<Uint8Array>({
    pull(c) {
      if (sent) c.close();
      else c.enqueue(bytes);
      sent = true;
    },
  });
  return { body, contentLength: bytes.length };
}

type U = { id: number; role: 'admin' | 'lead' | 'rater' | 'observer' };
let uploads: Awaited<ReturnType<typeof useTempUploads>>;
const users = {} as Record<'lead' | 'otherLead' | 'rater' | 'rater2' | 'observer' | 'admin', U>;
let studyId: number;
let runA: number;
let runB: number;

const fixture = (name: string) => readFileSync(path.resolve('tests/fixtures/uploads', name));
const q = (name: string, sub: string) => runUploadQuerySchema.parse({ name, sub, task: 'rest' });
const email = async (id: number) => (await db('users').where({ id }).first('email')).email as string;

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

beforeAll(async () => {
  uploads = await useTempUploads();
  for (const [key, role] of [
    ['lead', 'lead'],
    ['otherLead', 'lead'],
    ['rater', 'rater'],
    ['rater2', 'rater'],
    ['observer', 'observer'],
    ['admin', 'admin'],
  ] as const) {
    users[key] = { id: await createUser(db, { role }), role };
  }
  studyId = await createStudy({ user: users.lead, values: studySchema.parse({ ...STUDY_DEFAULTS, name: 'Access study', dropVolumes: 2 }) });
  await createStudy({ user: users.otherLead, values: { ...STUDY_DEFAULTS, name: 'Another study' } });
  await addMember({ actor: users.lead, studyId, email: await email(users.rater.id), studyRole: 'rater' });
  await addMember({ actor: users.lead, studyId, email: await email(users.rater2.id), studyRole: 'rater' });
  await addMember({ actor: users.lead, studyId, email: await email(users.observer.id), studyRole: 'observer' });
  runA = (
    await uploadRun({ user: users.lead, studyId, query: q('sub-01_task-rest_bold.nii.gz', '01'), raw: rawBody(fixture('good-run.nii.gz')) })
  ).id;
  runB = (
    await uploadRun({ user: users.admin, studyId, query: q('sub-02_task-rest_bold.nii', '02'), raw: rawBody(fixture('good-run-b.nii')) })
  ).id;
  await db('assignments').insert({ run_id: runA, rater_id: users.rater.id, assigned_by: users.lead.id });
});

afterAll(async () => {
  await uploads.cleanup();
  await db.destroy();
});

describe('studies', () => {
  it('makes the creator the lead member and keeps the protocol', async () => {
    const access = await studyWithAccess({ user: users.lead, studyId });
    expect(access).toMatchObject({ studyRole: 'lead', canManage: true, seesAllRuns: true });
    expect(access!.study).toMatchObject({
      blinding: true,
      dimMethod: 'iid-mdl',
      dropVolumes: 2,
      labelSet: ['signal', 'noise', 'uncertain'],
    });
    await updateStudy({ user: users.lead, studyId, values: { dimMethod: 'fixed', fixedComponents: 12, allowUncertain: false } });
    const after = await studyWithAccess({ user: users.lead, studyId });
    expect(after!.study).toMatchObject({ dimMethod: 'fixed', fixedComponents: 12, labelSet: ['signal', 'noise'] });
    expect(await db('audit_log').where({ study_id: studyId, action: 'study.update' }).count({ n: '*' })).toEqual([{ n: 1 }]);
  });

  it('refuses a fixed method without N, and member changes that break the rules', async () => {
    expect(studySchema.safeParse({ ...STUDY_DEFAULTS, name: 'x y z', dimMethod: 'fixed', fixedComponents: null }).success).toBe(false);
    expect(studySchema.safeParse({ ...STUDY_DEFAULTS, name: 'x y z', ratersPerRun: 6 }).success).toBe(false);
    expect((await refusal(addMember({ actor: users.lead, studyId, email: 'nobody@test.quorum.invalid', studyRole: 'rater' }))).status).toBe(
      404,
    );
    expect(
      (await refusal(addMember({ actor: users.lead, studyId, email: await email(users.observer.id), studyRole: 'lead' }))).message,
    ).toMatch(/cannot be a study lead/);
    expect((await refusal(removeMember({ actor: users.lead, studyId, userId: users.lead.id }))).message).toMatch(/only lead/);
  });

  it('is invisible to a lead of another study', async () => {
    expect(await studyWithAccess({ user: users.otherLead, studyId })).toBeNull();
  });
});

describe('refusals by role', () => {
  it('a rater and an observer have no upload permission, and are refused by the study scope too', async () => {
    expect(can('rater', 'runs.upload')).toBe(false);
    expect(can('observer', 'runs.upload')).toBe(false);
    expect(can('observer', 'runs.manage')).toBe(false);
    for (const who of [users.rater, users.observer]) {
      const err = await refusal(
        uploadRun({ user: who, studyId, query: q('sub-03_bold.nii.gz', '03'), raw: rawBody(fixture('good-run.nii.gz')) }),
      );
      expect(err.status).toBe(403);
      expect(err.message).toMatch(/only its leads and the facility admin/);
      expect((await refusal(deleteRun({ user: who, runId: runA, confirmVotes: true }))).status).toBe(403);
    }
  });

  it('a lead of another study can neither upload nor change runs (404: the study is not theirs to see)', async () => {
    expect(
      (
        await refusal(
          uploadRun({ user: users.otherLead, studyId, query: q('sub-03_bold.nii.gz', '03'), raw: rawBody(fixture('good-run.nii.gz')) }),
        )
      ).status,
    ).toBe(404);
    expect((await refusal(queueRun({ user: users.otherLead, runId: runA }))).status).toBe(404);
    expect((await refusal(deleteRun({ user: users.otherLead, runId: runA, confirmVotes: true }))).status).toBe(404);
    expect(await listRunsForStudy({ user: users.otherLead, studyId })).toEqual([]);
  });

  it('a rater sees only the runs assigned to them; leads, observers and admins see all', async () => {
    expect((await listRunsForStudy({ user: users.rater, studyId })).map((r) => r.id)).toEqual([runA]);
    expect(await listRunsForStudy({ user: users.rater2, studyId })).toEqual([]);
    for (const who of [users.lead, users.observer, users.admin]) {
      expect((await listRunsForStudy({ user: who, studyId })).map((r) => r.id).sort()).toEqual([runA, runB].sort());
    }
    const raterProgress = await studyProgress({ user: users.rater, studyId, seesAllRuns: false });
    expect(raterProgress).toMatchObject({ runs: 1, openDisagreements: null });
    const leadProgress = await studyProgress({ user: users.lead, studyId, seesAllRuns: true });
    expect(leadProgress).toMatchObject({ runs: 2, runsByStatus: { uploaded: 2 }, openDisagreements: 0 });
  });
});

describe('run actions', () => {
  it('queue → cancel → retry, and refuses actions that do not fit the status', async () => {
    expect((await queueRun({ user: users.lead, runId: runB })).status).toBe('queued');
    expect((await refusal(queueRun({ user: users.lead, runId: runB }))).status).toBe(409);
    expect((await refusal(retryRun({ user: users.lead, runId: runB }))).message).toMatch(/Only a failed or cancelled run/);
    const cancelled = await cancelRun({ user: users.lead, runId: runB });
    expect(cancelled.status).toBe('cancelled');
    expect(cancelled.job?.status).toBe('cancelled');
    const retried = await retryRun({ user: users.lead, runId: runB });
    expect(retried).toMatchObject({ status: 'queued', job: { status: 'queued' } });
    await cancelRun({ user: users.lead, runId: runB });
    const again = await queueRun({ user: users.lead, runId: runB, settings: { dimMethod: 'fixed', fixedComponents: 7 } });
    const job = await db('jobs').where({ id: again.job!.id }).first('payload');
    expect(typeof job.payload === 'string' ? JSON.parse(job.payload) : job.payload).toEqual({
      runId: runB,
      decompositionOptions: { components: 7 },
    });
  });

  it('deleting a run with votes asks twice, then removes it, its files and writes an audit entry', async () => {
    const [decId] = await db('decompositions').insert({ run_id: runA, parameters: '{}', k: 1, is_current: true });
    const [compId] = await db('components').insert({ decomposition_id: decId, idx: 1, variance_explained: 0.2, features: '{}' });
    await db('votes').insert({ component_id: compId, run_id: runA, rater_id: users.rater.id, label: 'noise', noise_kind: 'motion' });
    const first = await refusal(deleteRun({ user: users.lead, runId: runA, confirmVotes: false }));
    expect(first.status).toBe(409);
    expect(first.message).toMatch(/already has 1 vote from 1 rater\. Deleting it removes them for good/);
    expect(first.fields?.confirmVotes).toBeDefined();
    const fileKey = (await db('runs').where({ id: runA }).first('file_key')).file_key;
    await deleteRun({ user: users.lead, runId: runA, confirmVotes: true });
    expect(await db('runs').where({ id: runA }).first()).toBeUndefined();
    expect(await db('votes').where({ run_id: runA }).first()).toBeUndefined();
    const audit = await db('audit_log')
      .where({ action: 'run.delete', target_id: String(runA) })
      .first();
    expect(audit).toBeDefined();
    expect(typeof audit.detail === 'string' ? JSON.parse(audit.detail) : audit.detail).toMatchObject({
      votes: 1,
      entities: 'sub-01_task-rest',
    });
    expect(() => readFileSync(path.join(uploads.dir, fileKey))).toThrow();
  });
});
