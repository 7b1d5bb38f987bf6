/**
 * Learned suggestions end to end (real MariaDB, real route handlers, the job kinds run in process):
 * a lead queues training from the study's released decisions; the train job stores model v1 with
 * the releases it learnt from and queues scoring; every component gets a stored P(noise) with the
 * model. The never-anchoring rule: the rater's suggestions payload carries nothing while the lead
 * has suggestions off, and, once on, only the components the rater has already voted on.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const factories = await import('./helpers/factories');
const { createStudyWithRaters, createUser } = factories;
const uploads = await factories.useTempUploads();
const { buildRequestedRelease } = await import('./helpers/release-jobs');
const { db, closeDb, parseJson } = await import('@/lib/db/knex');
const { claimJob } = await import('@/lib/jobs');
const { jobKinds } = await import('@/lib/worker/kinds');
const { runClaimedJob } = await import('@/lib/worker/runner');
const { queueScoringOfNewRun } = await import('@/lib/worker/kinds/score-suggestions');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const suggestionsRoute = await import('@/app/api/runs/[id]/suggestions/route');
const studySuggestionsRoute = await import('@/app/api/studies/[id]/suggestions/route');
const trainRoute = await import('@/app/api/studies/[id]/suggestions/train/route');
const modelRoute = await import('@/app/api/studies/[id]/suggestions/model/route');
const voteRoute = await import('@/app/api/runs/[id]/votes/[componentId]/route');
const releasesRoute = await import('@/app/api/studies/[id]/releases/route');
const archiveRoute = await import('@/app/api/releases/[releaseId]/archive/route');

const quiet = { info() {}, warn() {}, error() {} };
async function runNext(kind: string) {
  const job = await claimJob(db, { workerId: 'inproc', leaseMs: 60_000, kinds: [kind] });
  if (!job) return null;
  return runClaimedJob(db, job, { workerId: 'inproc', leaseMs: 60_000, kinds: jobKinds, logger: quiet, retryBaseMs: 0 });
}

let lead: number, raterA: number, raterB: number, studyId: number;
const runs: Awaited<ReturnType<typeof createReadyRun>>[] = [];

beforeAll(async () => {
  const s = await createStudyWithRaters(db, { raters: 2 });
  ({ leadId: lead, studyId } = s);
  [raterA, raterB] = s.raterIds as [number, number];
  for (const [i, sub] of ['s1', 's2', 's3', 's4'].entries())
    runs.push(await createReadyRun(db, { studyId, createdBy: lead, raterIds: [raterA], size: 'tiny', seed: 11 + i, sub, components: 8 }));
  // Released decisions of the first three runs (the fourth is the one the rater works on): a
  // study release whose frozen decisions call a component noise when its high-frequency power is
  // above 0.3 — invented labels; the test checks the flow, not the model's quality.
  const [releaseId] = await db('releases').insert({ study_id: studyId, run_id: null, version: 1, released_by: lead });
  for (const r of runs.slice(0, 3)) {
    const comps = await db('components').where({ decomposition_id: r.decompositionId }).orderBy('idx').select('id', 'idx', 'features');
    await db('release_decisions').insert(
      comps.map((c: { id: number; idx: number; features: unknown }, j: number) => {
        const hf = (parseJson<{ highFrequencyPower: number }>(c.features) ?? { highFrequencyPower: 0 }).highFrequencyPower;
        return {
          release_id: releaseId,
          component_id: c.id,
          run_id: r.runId,
          idx: c.idx,
          label: j === 0 ? 'uncertain' : hf > 0.3 || j % 3 === 1 ? 'noise' : 'signal',
          method: 'override',
        };
      }),
    );
  }
});

afterAll(async () => {
  await closeDb();
  await uploads.cleanup();
});

describe('training and scoring', () => {
  it('only a lead of the study may queue training; a study the lead does not lead is refused with a reason', async () => {
    actAs(raterA);
    expect((await callRoute(trainRoute.POST, { method: 'POST', url: '/', params: { id: String(studyId) }, body: {} })).status).toBe(403);
    const otherLead = await createUser(db, { role: 'lead' });
    actAs(otherLead);
    expect((await callRoute(trainRoute.POST, { method: 'POST', url: '/', params: { id: String(studyId) }, body: {} })).status).toBe(404);
    actAs(lead);
    const refused = await callRoute(trainRoute.POST, {
      method: 'POST',
      url: '/',
      params: { id: String(studyId) },
      body: { sourceStudyIds: [studyId, 999999] },
    });
    expect(refused.status).toBe(422);
    expect(refused.json.error.message).toMatch(/Study 999999 cannot be used/);
  });

  it('the train job stores model v1 with its releases and report, and the score job stores a suggestion per component', async () => {
    actAs(lead);
    const queued = await callRoute(trainRoute.POST, { method: 'POST', url: '/', params: { id: String(studyId) }, body: {} });
    expect(queued.status).toBe(202);
    const trained = await runNext('train-suggestions');
    expect(trained).toBe('succeeded');
    const model = await db('suggestion_models').where({ study_id: studyId }).first();
    expect(model.version).toBe(1);
    const training = parseJson<{ releases: { version: number }[]; skipped: number }>(model.training)!;
    expect(training.releases).toHaveLength(1);
    expect(training.skipped).toBe(3); // the three 'uncertain' decisions are not training labels
    const report = parseJson<{ n: number; subjects: number }>(model.report)!;
    expect(report.n).toBe(21);
    expect(report.subjects).toBe(3);
    expect(await runNext('score-suggestions')).toBe('succeeded');
    const stored = await db('suggestions').where({ model_id: model.id }).count({ n: '*' }).first();
    expect(Number(stored?.n)).toBe(runs.reduce((a, r) => a + r.k, 0));
  });

  it('a decomposition that becomes ready in a study with a model is queued for scoring', async () => {
    await db.transaction((trx) => queueScoringOfNewRun(trx, { studyId, runId: runs[3]!.runId }));
    const job = await db('jobs')
      .where({ kind: 'score-suggestions', study_id: studyId, status: 'queued' })
      .orderBy('id', 'desc')
      .first('payload');
    expect(parseJson(job.payload)).toEqual({ studyId, runId: runs[3]!.runId });
    expect(await runNext('score-suggestions')).toBe('succeeded');
  });

  it('the model exports as JSON with its coefficients or trees, feature definitions and training releases', async () => {
    actAs(lead);
    const res = await callRoute(modelRoute.GET, { url: '/', params: { id: String(studyId) } });
    expect(res.status).toBe(200);
    expect(res.res.headers.get('content-disposition')).toContain('suggestion-model-v1.json');
    expect(res.json.format).toBe('quorum-suggestion-model/1');
    expect(res.json.version).toBe(1);
    expect(res.json.features.imputation).toMatch(/median/);
    expect(res.json.training.releases[0].version).toBe(1);
    expect(res.json.model.logistic ?? res.json.model.forest).toBeTruthy();
  });
});

describe('never anchoring: a suggestion reaches a rater only after their own vote', () => {
  const run = () => runs[3]!;
  const get = () => callRoute(suggestionsRoute.GET, { url: `/api/runs/${run().runId}/suggestions`, params: { id: String(run().runId) } });

  it('while the lead has suggestions off, the rater gets none, even for voted components', async () => {
    actAs(raterA);
    await callRoute(voteRoute.PUT, {
      method: 'PUT',
      url: '/',
      params: { id: String(run().runId), componentId: String(run().componentIds[1]) },
      body: { label: 'signal', baseVersion: 0 },
    });
    const res = await get();
    expect(res.status).toBe(200);
    expect(res.json).toEqual({ enabled: false, modelVersion: 1, suggestions: [] });
  });

  it('with suggestions on, the payload has exactly the voted components, each with the model version', async () => {
    actAs(raterA);
    expect(
      (
        await callRoute(studySuggestionsRoute.PATCH, {
          method: 'PATCH',
          url: '/',
          params: { id: String(studyId) },
          body: { enabled: true },
        })
      ).status,
    ).toBe(403);
    actAs(lead);
    expect(
      (
        await callRoute(studySuggestionsRoute.PATCH, {
          method: 'PATCH',
          url: '/',
          params: { id: String(studyId) },
          body: { enabled: true },
        })
      ).json,
    ).toEqual({ enabled: true });
    actAs(raterA);
    const one = await get();
    expect(one.json.suggestions.map((s: { componentId: number }) => s.componentId)).toEqual([run().componentIds[1]]);
    expect(one.json.suggestions[0]).toMatchObject({ modelVersion: 1, label: expect.stringMatching(/^(signal|noise)$/) });
    const unvoted = run().componentIds.filter((_, i) => i !== 1);
    const text = JSON.stringify(one.json);
    for (const id of unvoted) expect(text).not.toContain(`"componentId":${id}`);
    await callRoute(voteRoute.PUT, {
      method: 'PUT',
      url: '/',
      params: { id: String(run().runId), componentId: String(run().componentIds[4]) },
      body: { label: 'noise', noiseKind: 'motion', baseVersion: 0 },
    });
    const two = await get();
    expect(two.json.suggestions.map((s: { componentId: number }) => s.componentId).sort()).toEqual(
      [run().componentIds[1], run().componentIds[4]].sort(),
    );
  });

  it('a rater not assigned to the run gets nothing (404)', async () => {
    actAs(raterB);
    const res = await get();
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.json)).not.toContain('pNoise');
  });
});

describe('the release ZIP carries the model in use', () => {
  it('with suggestions on, a release ZIP holds the model file, whose content is the exported model JSON', async () => {
    const { execFileSync } = await import('node:child_process');
    const { mkdtemp, readFile, readdir, rm, writeFile } = await import('node:fs/promises');
    const os = await import('node:os');
    const path = await import('node:path');
    expect(Boolean((await db('studies').where({ id: studyId }).first('suggestions_enabled')).suggestions_enabled)).toBe(true);
    // every component of the first run decided (invented labels), so the run can be released on its own
    const r = runs[0]!;
    for (const [i, componentId] of r.componentIds.entries()) {
      await db('decisions')
        .insert({
          component_id: componentId,
          run_id: r.runId,
          label: i % 3 === 1 ? 'noise' : 'signal',
          method: 'reconciled',
          reason: 'test',
          decided_by: lead,
        })
        .onConflict('component_id')
        .merge(['label', 'method', 'reason', 'decided_by']);
    }
    actAs(lead);
    const requested = await callRoute(releasesRoute.POST, {
      method: 'POST',
      url: `/api/studies/${studyId}/releases`,
      params: { id: String(studyId) },
      body: { runId: r.runId },
    });
    expect(requested.status, JSON.stringify(requested.json)).toBe(202);
    const created = await buildRequestedRelease(db, requested); // the worker's release job, run here
    expect(created.json.jobStatus, JSON.stringify(created.json)).toBe('succeeded');
    const releaseId = Number(created.json.releaseId);
    const exported = await callRoute(modelRoute.GET, { url: '/', params: { id: String(studyId) } });
    const res = await archiveRoute.GET(new Request(`http://localhost/api/releases/${releaseId}/archive`), {
      params: Promise.resolve({ releaseId: String(releaseId) }),
    });
    expect(res.status).toBe(200);
    const dir = await mkdtemp(path.join(os.tmpdir(), 'quorum-model-zip-'));
    try {
      const zip = path.join(dir, 'release.zip');
      await writeFile(zip, Buffer.from(await res.arrayBuffer()));
      execFileSync('unzip', ['-q', zip, '-d', path.join(dir, 'x')]); // Debian's unzip reads the archive, not our code
      const [root] = await readdir(path.join(dir, 'x'));
      const names = await readdir(path.join(dir, 'x', root!), { recursive: true });
      const modelFiles = names.filter((n) => String(n).endsWith('_desc-suggestions_model.json'));
      expect(modelFiles).toHaveLength(1);
      const inZip = JSON.parse(await readFile(path.join(dir, 'x', root!, String(modelFiles[0])), 'utf8'));
      // the exported model JSON, plus the release's sidecar fields (GeneratedBy, Release, Caution, format)
      for (const key of Object.keys(exported.json)) expect(inZip[key], key).toEqual(exported.json[key]);
      expect(inZip.Release).toMatchObject({ StudyId: studyId, ReleaseId: releaseId });
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });
});
