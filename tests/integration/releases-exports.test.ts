/* eslint-disable @typescript-eslint/no-explicit-any -- manifests, TSV rows and raw SQL rows are read back untyped to check them field by field */
/**
 * Releases and exports against the real MariaDB, through the real route handlers, as each role:
 * a lead releases a study whose decisions are complete (decisions made directly, votes from two
 * submitted raters); every exported file is checked against the database; the streamed ZIP is
 * unzipped (Debian's `unzip`) and its manifest checksums verified; versions increment and old
 * releases stay downloadable; refusals (incomplete decisions, wrong roles, another study's lead,
 * unknown files); a denoise job run by the real runner writes a file that passes the regression
 * checks; the pipeline API with personal access tokens (read-only, revoked, wrong).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { createHash } from 'node:crypto';
import { execFileSync } from 'node:child_process';
import { mkdtemp, readFile, readdir, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';
import { markSubmitted } from './helpers/submitted';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-releases-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb, blobToFloat32 } = await import('@/lib/db/knex');
const { seedDemo } = await import('@/db/seeds/demo');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const { pathFor } = await import('@/lib/storage');
const { parseTsv } = await import('@/lib/exports/tabular');
const { EXPORT_CAUTION } = await import('@/lib/exports/cautions');
const { buildDesign } = await import('@/lib/denoise/regress');
const { decodeNifti } = await import('@/lib/nifti');
const { claimJob, completeJob, getJob, reportProgress, requeueExpiredLeases } = await import('@/lib/jobs/queue');
const { runClaimedJob } = await import('@/lib/worker/runner');
const { jobKinds } = await import('@/lib/worker/kinds');
const releasesRoute = await import('@/app/api/studies/[id]/releases/route');
const releaseJobRoute = await import('@/app/api/studies/[id]/releases/jobs/[jobId]/route');
const { buildRequestedRelease } = await import('./helpers/release-jobs');
const releaseRoute = await import('@/app/api/releases/[releaseId]/route');
const archiveRoute = await import('@/app/api/releases/[releaseId]/archive/route');
const fileRoute = await import('@/app/api/releases/[releaseId]/files/[name]/route');
const denoiseRoute = await import('@/app/api/runs/[id]/denoise/route');
const denoiseFileRoute = await import('@/app/api/runs/[id]/denoise/[jobId]/route');
const tokensRoute = await import('@/app/api/account/tokens/route');
const tokenRoute = await import('@/app/api/account/tokens/[tokenId]/route');
const v1RunsRoute = await import('@/app/api/v1/studies/[id]/releases/latest/runs/route');
const v1FileRoute = await import('@/app/api/v1/releases/[releaseId]/files/[name]/route');

let users: Record<string, number>;
let studyId: number;
let runs: Awaited<ReturnType<typeof createReadyRun>>[];
const u = (name: string) => users[`${name}@fernhollow.example`]!;
const sha = (b: Buffer | string) => createHash('sha256').update(b).digest('hex');

function release(body: unknown = {}, headers: Record<string, string> = {}) {
  return callRoute(releasesRoute.POST, {
    method: 'POST',
    url: `/api/studies/${studyId}/releases`,
    params: { id: String(studyId) },
    body,
    headers,
  });
}
async function bytesOf(res: Response): Promise<Buffer> {
  return Buffer.from(await res.arrayBuffer());
}

/** Label pattern for a component: every 3rd noise, every 7th uncertain; raters disagree on every 5th. */
const decided = (idx: number) => (idx % 7 === 0 ? 'uncertain' : idx % 3 === 0 ? 'noise' : 'signal');

beforeAll(async () => {
  const seeded = await seedDemo(db);
  users = seeded.users;
  const [id] = await db('studies').insert({
    name: 'Release test study',
    created_by: u('lead'),
    raters_per_run: 2,
    consensus_rule: 'majority',
    label_set: JSON.stringify(['signal', 'noise', 'uncertain']),
    noise_kinds: JSON.stringify(['motion', 'pulsation', 'other']),
    uncertain_in_export: 'keep',
  });
  studyId = Number(id);
  for (const [email, role] of [
    ['lead', 'lead'],
    ['rater1', 'rater'],
    ['rater2', 'rater'],
    ['observer', 'observer'],
  ] as const) {
    await db('study_members').insert({ study_id: studyId, user_id: u(email), study_role: role });
  }
  runs = [];
  for (const [i, sub] of ['rel01', 'rel02'].entries()) {
    runs.push(
      await createReadyRun(db, {
        studyId,
        createdBy: u('lead'),
        raterIds: [u('rater1'), u('rater2')],
        size: 'tiny',
        seed: 11 + i,
        sub,
        components: 8,
      }),
    );
  }
  // votes from two submitted raters, and decisions (one still pending for the refusal test)
  for (const run of runs) {
    for (const [n, componentId] of run.componentIds.entries()) {
      const idx = n + 1;
      const label = decided(idx);
      const other = idx % 5 === 0 ? (label === 'signal' ? 'noise' : 'signal') : label;
      await db('votes').insert([
        { component_id: componentId, run_id: run.runId, rater_id: u('rater1'), label, noise_kind: label === 'noise' ? 'motion' : null },
        {
          component_id: componentId,
          run_id: run.runId,
          rater_id: u('rater2'),
          label: other,
          noise_kind: other === 'noise' ? 'pulsation' : null,
        },
      ]);
      const reconciled = idx % 5 === 0;
      await db('decisions').insert({
        component_id: componentId,
        run_id: run.runId,
        label: reconciled && run === runs[0] && idx === 5 ? null : label,
        noise_kind: label === 'noise' ? 'motion' : null,
        method: reconciled ? (run === runs[0] && idx === 5 ? 'pending' : 'reconciled') : 'unanimous',
        decided_by: reconciled ? u('lead') : null,
        reason: reconciled ? `Lead looked at component ${idx}: rim pattern` : null,
      });
    }
    await markSubmitted(db, { runId: run.runId });
  }
});

afterAll(async () => {
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('release refusals', () => {
  it('refuses roles without releases.create (403), no session (401), and a lead of another study (404)', async () => {
    actAs(null);
    expect((await release()).status).toBe(401);
    for (const who of ['rater1', 'observer']) {
      actAs(u(who));
      expect((await release()).status).toBe(403);
    }
    actAs(u('lead2'));
    const other = await release();
    expect(other.status).toBe(404);
  });

  it('refuses while a decision is pending, saying how many and where to reconcile (409)', async () => {
    actAs(u('lead'));
    const res = await release();
    expect(res.status).toBe(409);
    expect(res.json.error.message).toMatch(/1 of 16 components have no final decision yet \(1 pending/);
    expect(res.json.error.message).toContain(`/studies/${studyId}/reconcile`);
    expect(await db('releases').where({ study_id: studyId }).count('* as n').first()).toMatchObject({ n: 0 });
  });
});

describe('a study release', () => {
  let releaseId: number;
  let manifest: any;

  beforeAll(async () => {
    await db('decisions')
      .where({ component_id: runs[0]!.componentIds[4] })
      .update({ label: 'noise', noise_kind: 'other', method: 'reconciled', reason: 'Lead: edge ring, noise' });
    actAs(u('lead'));
    // a forged X-Forwarded-For without a trusted proxy must not reach the audit log (issue 13 item 10)
    delete process.env.QUORUM_TRUST_PROXY;
    const asked = await release({ notes: 'Friday release' }, { 'x-forwarded-for': '6.6.6.6' });
    // the request only queues the release job (202); nothing is released until the worker ran it
    expect(asked.status, JSON.stringify(asked.json)).toBe(202);
    expect(await db('releases').where({ study_id: studyId }).count('* as n').first()).toMatchObject({ n: 0 });
    const progress = await callRoute(releaseJobRoute.GET, {
      url: `/api/studies/${studyId}/releases/jobs/${asked.json.jobId}`,
      params: { id: String(studyId), jobId: String(asked.json.jobId) },
    });
    expect(progress.json).toMatchObject({ status: 'queued', message: 'Waiting for a worker', release: null });
    // a second click while it waits joins the same job: two clicks, one release
    const again = await release({ notes: 'Friday release' });
    expect(again.json).toEqual({ jobId: asked.json.jobId, existing: true });
    const res = await buildRequestedRelease(db, asked);
    expect(res.json.jobStatus, res.json.jobMessage).toBe('succeeded');
    expect(res.json.version).toBe(1);
    expect(await db('releases').where({ study_id: studyId }).count('* as n').first()).toMatchObject({ n: 1 });
    const finished = await callRoute(releaseJobRoute.GET, {
      url: `/api/studies/${studyId}/releases/jobs/${asked.json.jobId}`,
      params: { id: String(studyId), jobId: String(asked.json.jobId) },
    });
    expect(finished.json).toMatchObject({ status: 'succeeded', release: { releaseId: res.json.releaseId, version: 1 } });
    releaseId = res.json.releaseId;
    manifest = (await db('releases').where({ id: releaseId }).first('manifest')).manifest;
    manifest = typeof manifest === 'string' ? JSON.parse(manifest) : manifest;
  });

  it('freezes every decision into release_decisions, with who and when, and audits it', async () => {
    const frozen = await db('release_decisions').where({ release_id: releaseId }).orderBy(['run_id', 'idx']);
    const live = await db('decisions as x')
      .join('components as c', 'c.id', 'x.component_id')
      .whereIn(
        'x.run_id',
        runs.map((r) => r.runId),
      )
      .orderBy(['x.run_id', 'c.idx'])
      .select('x.component_id', 'x.label', 'x.noise_kind', 'x.method', 'c.idx');
    expect(frozen.map((f: any) => [f.component_id, f.idx, f.label, f.noise_kind, f.method])).toEqual(
      live.map((l: any) => [l.component_id, l.idx, l.label, l.noise_kind, l.method]),
    );
    const row = await db('releases').where({ id: releaseId }).first();
    expect(row.released_by).toBe(u('lead'));
    expect(row.released_at).toBeInstanceOf(Date);
    const audit = await db('audit_log')
      .where({ action: 'release.create', target_id: String(releaseId) })
      .first();
    expect(audit.actor_id).toBe(u('lead'));
    expect(audit.study_id).toBe(studyId);
    expect(audit.ip).toBeNull(); // the forged X-Forwarded-For was not believed
  });

  it("ships each run's component maps with the checksum kept on the decomposition (hashed once when it had none) and stores the report it computed", async () => {
    for (const run of runs) {
      const entry = manifest.runs.find((r: any) => r.runId === run.runId);
      const map = manifest.files.find((f: any) => f.runId === run.runId && f.name.endsWith('_desc-sources_components.nii.gz'));
      const bytes = await readFile(pathFor(map.key));
      // the test runs' decompositions were stored without a checksum: the release job hashed the file and kept it
      const dec = await db('decompositions').where({ id: entry.decompositionId }).first('components_sha256', 'components_bytes');
      expect(dec).toEqual({ components_sha256: sha(bytes), components_bytes: bytes.length });
      expect(map).toMatchObject({ sha256: sha(bytes), bytes: bytes.length });
    }
    // the report page reads the statistics the job computed: the same report the release's JSON file holds
    const file = manifest.files.find((f: any) => f.name.endsWith('_desc-agreement_report.json'));
    const shipped = JSON.parse(await readFile(pathFor(file.key), 'utf8'));
    const row = await db('releases').where({ id: releaseId }).first('agreement_report');
    expect(JSON.parse(row.agreement_report)).toEqual(shipped.report);
  });

  it('writes per-run files whose content matches the database, with sidecars describing every column and the caution', async () => {
    const read = async (name: string) => readFile(pathFor(manifest.files.find((f: any) => f.name === name).key));
    for (const run of runs) {
      const entry = manifest.runs.find((r: any) => r.runId === run.runId);
      const stem = entry.stem as string;
      expect(stem).toMatch(/^sub-rel0\d_ses-1_task-rest$/);
      const comps = await db('components as c')
        .leftJoin('decisions as x', 'x.component_id', 'c.id')
        .where('c.decomposition_id', run.decompositionId)
        .orderBy('c.idx')
        .select('c.idx', 'c.timecourse', 'c.features', 'x.label', 'x.noise_kind', 'x.method', 'x.reason');
      const verdicts = parseTsv((await read(`${stem}_desc-decisions_components.tsv`)).toString());
      expect(verdicts.rows).toHaveLength(comps.length);
      const col = (name: string) => verdicts.header.indexOf(name);
      for (const [i, c] of comps.entries()) {
        const row = verdicts.rows[i]!;
        expect(row[col('component')]).toBe(String(c.idx));
        expect(row[col('label')]).toBe(c.label);
        expect(row[col('noise_kind')]).toBe(c.noise_kind ?? 'n/a');
        expect(row[col('decided_by')]).toBe(c.method);
        expect(row[col('lead_reason')]).toBe(c.reason ?? 'n/a');
        expect(row[col('in_noise_list')]).toBe(c.label === 'noise' ? '1' : '0'); // uncertain kept (study default)
        const votes = await db('votes as v')
          .join('components as cc', 'cc.id', 'v.component_id')
          .where({ 'cc.decomposition_id': run.decompositionId, 'cc.idx': c.idx })
          .select('v.label', 'v.rater_id');
        for (const l of ['signal', 'noise', 'uncertain'])
          expect(row[col(`votes_${l}`)]).toBe(String(votes.filter((v: any) => v.label === l).length));
        const codes = Object.fromEntries(manifest.raters.map((r: any) => [r.name, r.code]));
        const r1 = votes.find((v: any) => v.rater_id === u('rater1'));
        expect(row[col('rater_labels')]).toContain(`${codes['Amara Lindqvist']}=${r1.label}`);
      }
      const noise = comps.filter((c: any) => c.label === 'noise').map((c: any) => c.idx);
      expect(entry.noise).toEqual(noise);
      expect((await read(`${stem}_desc-noiselist_components.txt`)).toString()).toBe(noise.join(',') + '\n');
      expect(parseTsv((await read(`${stem}_desc-noiselist_components.tsv`)).toString()).rows.map((r) => Number(r[0]))).toEqual(noise);
      // time courses: a column per component, equal to the stored float32 blobs
      const tcs = parseTsv((await read(`${stem}_desc-sources_timeseries.tsv`)).toString());
      expect(tcs.header).toEqual(comps.map((c: any) => `component_${c.idx}`));
      for (const [j, c] of comps.entries()) {
        const blob = blobToFloat32(c.timecourse)!;
        expect(tcs.rows).toHaveLength(blob.length);
        for (let t = 0; t < blob.length; t += 7) expect(Number(tcs.rows[t]![j])).toBeCloseTo(blob[t]!, 5);
      }
      // features with decisions
      const feats = parseTsv((await read(`${stem}_desc-ratedfeatures_components.tsv`)).toString());
      const kIdx = feats.header.indexOf('kurtosis');
      for (const [i, c] of comps.entries()) {
        const f = typeof c.features === 'string' ? JSON.parse(c.features) : c.features;
        expect(Number(feats.rows[i]![kIdx])).toBeCloseTo(f.kurtosis, 4);
        expect(feats.rows[i]![feats.header.indexOf('label')]).toBe(c.label);
      }
      // every TSV: a sidecar describing each column, with the caution
      for (const name of manifest.files.map((f: any) => f.name).filter((n: string) => n.endsWith('.tsv'))) {
        const header = parseTsv((await read(name)).toString()).header;
        const side = JSON.parse((await read(name.replace(/\.tsv$/, '.json'))).toString());
        for (const h of header) expect(side[h]?.Description, `${name}: ${h}`).toBeTruthy();
        expect(side.Caution).toBe(EXPORT_CAUTION);
      }
      const mapSide = JSON.parse((await read(`${stem}_desc-sources_components.json`)).toString());
      expect(mapSide.NoiseListRule).toMatch(/NOT in the noise list/);
    }
    const methods = (await read(`study-${studyId}_desc-methods_report.md`)).toString();
    expect(methods).toMatch(/symmetric FastICA/);
    expect(methods).toMatch(/1000 resamples, seed 1/);
    // what was enforced and what is known about the raters (issue 13 item 2, issue 15 item 8)
    expect(methods).not.toMatch(/trained raters/i);
    expect(methods).toMatch(/none of them certified on a calibration set in Quorum/);
    expect(methods).toMatch(/withheld the other raters' labels from each rater until that rater had submitted the run/);
    expect(methods).toMatch(/no submission was reopened\. Agreement statistics use each rater's labels as first submitted\./);
    expect(methods).toMatch(/Research software: not for diagnosis/);
  });

  it('streams a ZIP whose manifest checksums match every file in it', async () => {
    actAs(u('observer'));
    const res = await archiveRoute.GET(new Request(`http://localhost/api/releases/${releaseId}/archive`), {
      params: Promise.resolve({ releaseId: String(releaseId) }),
    });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/zip');
    const dir = await mkdtemp(path.join(os.tmpdir(), 'quorum-zip-'));
    try {
      const zipPath = path.join(dir, 'release.zip');
      await writeFile(zipPath, await bytesOf(res));
      execFileSync('unzip', ['-q', zipPath, '-d', path.join(dir, 'x')]);
      const [root] = await readdir(path.join(dir, 'x'));
      expect(root).toBe(`study-${studyId}_release-v1`);
      const zipManifest = JSON.parse(await readFile(path.join(dir, 'x', root!, 'manifest.json'), 'utf8'));
      expect(zipManifest.files.length).toBe(manifest.files.length);
      expect(zipManifest.files.every((f: any) => !('key' in f))).toBe(true);
      expect(zipManifest.software.version).toBe('0.1.0');
      expect(zipManifest.cautions.join(' ')).toMatch(/not for diagnosis/);
      expect(zipManifest.runs[0].parameters).toBeTruthy();
      for (const f of zipManifest.files) {
        const content = await readFile(path.join(dir, 'x', root!, f.path));
        expect(sha(content), f.path).toBe(f.sha256);
        expect(content.length).toBe(f.bytes);
      }
      // component maps are there as NIfTI with k volumes
      const mapFile = zipManifest.files.find((f: any) => f.name.endsWith('_desc-sources_components.nii.gz'));
      expect(decodeNifti(await readFile(path.join(dir, 'x', root!, mapFile.path))).nt).toBe(8);
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });

  it('serves single files to readers, 404 for unknown names and to users outside the study; a rater may not download', async () => {
    const call = (releaseIdArg: number, name: string) =>
      fileRoute.GET(new Request(`http://localhost/api/releases/${releaseIdArg}/files/${name}`), {
        params: Promise.resolve({ releaseId: String(releaseIdArg), name }),
      });
    const txt = manifest.files.find((f: any) => f.name.endsWith('_desc-noiselist_components.txt'));
    actAs(u('observer'));
    const ok = await call(releaseId, txt.name);
    expect(ok.status).toBe(200);
    expect(ok.headers.get('x-content-sha256')).toBe(txt.sha256);
    expect((await call(releaseId, 'no-such-file.tsv')).status).toBe(404);
    expect((await call(999999, txt.name)).status).toBe(404); // an unreleased (non-existent) release
    actAs(u('lead2'));
    expect((await call(releaseId, txt.name)).status).toBe(404); // another study's lead
    expect(
      (await archiveRoute.GET(new Request('http://localhost/x'), { params: Promise.resolve({ releaseId: String(releaseId) }) })).status,
    ).toBe(404);
    actAs(u('rater1'));
    expect((await call(releaseId, txt.name)).status).toBe(403);
  });

  it('a later change needs a new release: version 2, the list shows both, the old one stays downloadable', async () => {
    actAs(u('lead'));
    await db('decisions')
      .where({ component_id: runs[1]!.componentIds[0] })
      .update({ label: 'noise', noise_kind: 'motion', method: 'override', reason: 'Lead: second look' });
    const detail1 = await callRoute(releaseRoute.GET, { url: `/api/releases/${releaseId}`, params: { releaseId: String(releaseId) } });
    expect(detail1.json.changedSince).toBe(1);
    const res = await buildRequestedRelease(db, await release());
    expect(res.status).toBe(202);
    expect(res.json.version).toBe(2);
    const list = await callRoute(releasesRoute.GET, { url: `/api/studies/${studyId}/releases`, params: { id: String(studyId) } });
    expect(list.json.releases.map((r: any) => r.version)).toEqual([2, 1]);
    expect(list.json.releases[0].manifest.runs.find((r: any) => r.runId === runs[1]!.runId).noise).toContain(1);
    expect(list.json.releases[1].manifest.runs.find((r: any) => r.runId === runs[1]!.runId).noise).not.toContain(1);
    const old = await archiveRoute.GET(new Request('http://localhost/x'), { params: Promise.resolve({ releaseId: String(releaseId) }) });
    expect(old.status).toBe(200);
    expect((await bytesOf(old)).length).toBeGreaterThan(1000);
    // a run release has its own version sequence
    const runRelease = await buildRequestedRelease(db, await release({ runId: runs[0]!.runId }));
    expect(runRelease.json.version).toBe(1);
  });

  it('denoises a released run in the worker (partial): removed components leave no share in the residual, kept ones are untouched', async () => {
    const run = runs[0]!;
    actAs(u('observer'));
    expect(
      (
        await callRoute(denoiseRoute.POST, {
          method: 'POST',
          url: `/api/runs/${run.runId}/denoise`,
          params: { id: String(run.runId) },
          body: { releaseId },
        })
      ).status,
    ).toBe(403);
    actAs(u('lead2'));
    expect(
      (
        await callRoute(denoiseRoute.POST, {
          method: 'POST',
          url: `/api/runs/${run.runId}/denoise`,
          params: { id: String(run.runId) },
          body: { releaseId },
        })
      ).status,
    ).toBe(404);
    actAs(u('lead'));
    const req = await callRoute(denoiseRoute.POST, {
      method: 'POST',
      url: `/api/runs/${run.runId}/denoise`,
      params: { id: String(run.runId) },
      body: { releaseId, mode: 'partial' },
    });
    expect(req.status, JSON.stringify(req.json)).toBe(202);
    const notYet = await denoiseFileRoute.GET(new Request('http://localhost/x'), {
      params: Promise.resolve({ id: String(run.runId), jobId: String(req.json.jobId) }),
    });
    expect(notYet.status).toBe(409);

    const logger = { info: () => {}, warn: () => {}, error: (m: string) => console.error(m) };
    const job = await claimJob(db, { workerId: 'test-worker', kinds: ['denoise'], leaseMs: 60_000 });
    expect(job?.id).toBe(req.json.jobId);
    const outcome = await runClaimedJob(db, job!, { workerId: 'test-worker', leaseMs: 60_000, kinds: jobKinds, logger });
    const row = await db('jobs').where({ id: job!.id }).first('message', 'error');
    expect(outcome, `the job's message: ${row?.message}\n${row?.error}`).toBe('succeeded');

    const list = await callRoute(denoiseRoute.GET, { url: `/api/runs/${run.runId}/denoise`, params: { id: String(run.runId) } });
    const done = list.json.jobs[0];
    expect(done.status).toBe('succeeded');
    expect(done.file.name).toMatch(/^sub-rel01_ses-1_task-rest_desc-denoisedpartial_bold\.nii\.gz$/);
    const res = await denoiseFileRoute.GET(new Request('http://localhost/x'), {
      params: Promise.resolve({ id: String(run.runId), jobId: String(done.jobId) }),
    });
    expect(res.status).toBe(200);
    const bytes = await bytesOf(res);
    expect(sha(bytes)).toBe(done.file.sha256);
    const out = decodeNifti(bytes);
    const input = decodeNifti(await readFile(pathFor((await db('runs').where({ id: run.runId }).first('file_key')).file_key)));
    const comps = await db('components').where({ decomposition_id: run.decompositionId }).orderBy('idx').select('timecourse');
    const k = comps.length;
    const T = blobToFloat32(comps[0].timecourse)!.length;
    expect(out.nt).toBe(T);
    expect(input.nt - T).toBe(2); // the decomposition dropped 2 volumes
    const tcs = new Float64Array(T * k);
    comps.forEach((c: any, j: number) => blobToFloat32(c.timecourse)!.forEach((v, t) => (tcs[t * k + j] = v)));
    const design = buildDesign({ timecourses: tcs, T, k, noise: [], mode: 'partial' });
    const noise = manifest.runs.find((r: any) => r.runId === run.runId).noise as number[];
    expect(noise.length).toBeGreaterThan(0);
    const mask = decodeNifti(
      await readFile(pathFor((await db('decompositions').where({ id: run.decompositionId }).first('mask_key')).mask_key)),
    ).readVolume(0);
    const voxels = [...mask.keys()].filter((i) => mask[i]! > 0).filter((_, n) => n % 37 === 0);
    const seriesOf = (img: ReturnType<typeof decodeNifti>, offset: number) => {
      const vol = new Float32Array(img.voxelsPerVolume);
      const s = voxels.map(() => new Float64Array(T));
      for (let t = 0; t < T; t++) {
        img.readVolume(t + offset, vol);
        voxels.forEach((v, i) => (s[i]![t] = vol[v]!));
      }
      return s;
    };
    const before = seriesOf(input, 2),
      after = seriesOf(out, 0);
    const beta = (y: Float64Array, comp: number) => {
      let s = 0;
      for (let t = 0; t < T; t++) s += design.pinv[comp * T + t]! * y[t]!;
      return s;
    };
    let maxRemoved = 0,
      maxBefore = 0,
      maxKeptDiff = 0;
    for (let i = 0; i < voxels.length; i++) {
      for (let c = 1; c <= k; c++) {
        const b0 = beta(before[i]!, c),
          b1 = beta(after[i]!, c);
        if (noise.includes(c)) {
          maxRemoved = Math.max(maxRemoved, Math.abs(b1));
          maxBefore = Math.max(maxBefore, Math.abs(b0));
        } else maxKeptDiff = Math.max(maxKeptDiff, Math.abs(b1 - b0) / Math.max(1e-6, Math.abs(b0) + 1));
      }
    }
    expect(maxRemoved).toBeLessThan(1e-3 * maxBefore);
    expect(maxKeptDiff).toBeLessThan(1e-3);
  });
});

describe('a worker lost during denoising (issue 13, faults)', () => {
  it('after its lease expires another worker finishes the job once; the lost worker can no longer complete it', async () => {
    const run = runs[0]!;
    const rel = await db('releases').where({ study_id: studyId, run_key: 0 }).orderBy('version', 'desc').first('id');
    actAs(u('lead'));
    const req = await callRoute(denoiseRoute.POST, {
      method: 'POST',
      url: `/api/runs/${run.runId}/denoise`,
      params: { id: String(run.runId) },
      body: { releaseId: rel.id, mode: 'full' },
    });
    expect(req.status, JSON.stringify(req.json)).toBe(202);
    // the worker that gets killed: it claimed the job and reported progress, then its process ended (its lease is never renewed)
    const lost = await claimJob(db, { workerId: 'killed-worker', kinds: ['denoise'], leaseMs: 60_000 });
    expect(lost?.id).toBe(req.json.jobId);
    expect(await reportProgress(db, lost!.id, 'killed-worker', { stage: 'regress', percent: 40 })).toBe(true);
    await db('jobs')
      .where({ id: lost!.id })
      .update({ lease_expires_at: db.raw('NOW(3) - INTERVAL 1 SECOND') });

    // the sweep every worker runs before claiming puts it back in the queue; another worker takes it
    expect((await requeueExpiredLeases(db)).requeued).toContain(lost!.id);
    const logger = { info: () => {}, warn: () => {}, error: (m: string) => console.error(m) };
    const again = await claimJob(db, { workerId: 'rescuer', kinds: ['denoise'], leaseMs: 60_000 });
    expect(again?.id).toBe(lost!.id);
    expect(await runClaimedJob(db, again!, { workerId: 'rescuer', leaseMs: 60_000, kinds: jobKinds, logger })).toBe('succeeded');
    expect(await getJob(db, lost!.id)).toMatchObject({ status: 'succeeded', attempts: 2 });
    // the lost worker's late completion changes nothing: one result, written by the rescuer
    expect(await completeJob(db, lost!.id, 'killed-worker', { file: 'late' })).toBe(false);
    const list = await callRoute(denoiseRoute.GET, { url: `/api/runs/${run.runId}/denoise`, params: { id: String(run.runId) } });
    const mine = list.json.jobs.filter((j: { jobId: number }) => j.jobId === lost!.id);
    expect(mine).toHaveLength(1);
    expect(mine[0].file.name).toMatch(/desc-denoisedfull_bold\.nii\.gz$/);
    const res = await denoiseFileRoute.GET(new Request('http://localhost/x'), {
      params: Promise.resolve({ id: String(run.runId), jobId: String(lost!.id) }),
    });
    expect(res.status).toBe(200);
    expect(sha(await bytesOf(res))).toBe(mine[0].file.sha256);
  });
});

describe('denoise, full regression with motion regressors', () => {
  it('leaves a residual orthogonal to every removed noise course and motion parameter', async () => {
    const run = runs[1]!;
    const rel = await db('releases').where({ study_id: studyId, run_key: 0 }).orderBy('version', 'desc').first('id', 'manifest');
    const manifest = typeof rel.manifest === 'string' ? JSON.parse(rel.manifest) : rel.manifest;
    const noise = manifest.runs.find((r: any) => r.runId === run.runId).noise as number[];
    actAs(u('lead'));
    const req = await callRoute(denoiseRoute.POST, {
      method: 'POST',
      url: `/api/runs/${run.runId}/denoise`,
      params: { id: String(run.runId) },
      body: { releaseId: rel.id, mode: 'full', includeMotion: true },
    });
    expect(req.status, JSON.stringify(req.json)).toBe(202);
    const logger = { info: () => {}, warn: () => {}, error: (m: string) => console.error(m) };
    const job = await claimJob(db, { workerId: 'test-worker', kinds: ['denoise'], leaseMs: 60_000 });
    expect(job?.id).toBe(req.json.jobId);
    const outcome = await runClaimedJob(db, job!, { workerId: 'test-worker', leaseMs: 60_000, kinds: jobKinds, logger });
    const row = await db('jobs').where({ id: job!.id }).first('message', 'error');
    expect(outcome, `the job's message: ${row?.message}\n${row?.error}`).toBe('succeeded');
    const done = (await db('jobs').where({ id: req.json.jobId }).first('result')).result;
    const result = typeof done === 'string' ? JSON.parse(done) : done;
    expect(result).toMatchObject({ mode: 'full', includeMotion: true, noise });
    const out = decodeNifti(await readFile(pathFor(result.key)));
    const comps = await db('components').where({ decomposition_id: run.decompositionId }).orderBy('idx').select('timecourse');
    const courses = comps.map((c: any) => blobToFloat32(c.timecourse)!);
    const T = courses[0]!.length;
    expect(out.nt).toBe(T);
    const { parseMotionFile, dropInitialVolumes } = await import('@/lib/decomposition/motion');
    const motionKey = (await db('runs').where({ id: run.runId }).first('motion_key')).motion_key;
    const motion = dropInitialVolumes(
      parseMotionFile(await readFile(pathFor(motionKey), 'utf8'), { order: 'trans-first', rotationUnits: 'radians', expectedRows: T + 2 }),
      2,
    );
    const regressors = [...noise.map((n) => courses[n - 1]!), ...motion.translations, ...motion.rotations];
    const mask = decodeNifti(
      await readFile(pathFor((await db('decompositions').where({ id: run.decompositionId }).first('mask_key')).mask_key)),
    ).readVolume(0);
    const voxels = [...mask.keys()].filter((i) => mask[i]! > 0).filter((_, n) => n % 53 === 0);
    const vol = new Float32Array(out.voxelsPerVolume);
    const series = voxels.map(() => new Float64Array(T));
    for (let t = 0; t < T; t++) {
      out.readVolume(t, vol);
      voxels.forEach((v, i) => (series[i]![t] = vol[v]!));
    }
    const corr = (a: ArrayLike<number>, b: ArrayLike<number>) => {
      let ma = 0,
        mb = 0;
      for (let t = 0; t < T; t++) {
        ma += a[t]!;
        mb += b[t]!;
      }
      ma /= T;
      mb /= T;
      let ab = 0,
        aa = 0,
        bb = 0;
      for (let t = 0; t < T; t++) {
        const x = a[t]! - ma,
          y = b[t]! - mb;
        ab += x * y;
        aa += x * x;
        bb += y * y;
      }
      return aa && bb ? ab / Math.sqrt(aa * bb) : 0;
    };
    let worst = 0;
    for (const s of series) for (const r of regressors) worst = Math.max(worst, Math.abs(corr(s, r)));
    expect(worst).toBeLessThan(1e-3);
  });
});

describe('pipeline API with personal access tokens', () => {
  let token: string;
  let tokenId: number;
  const v1 = (tok: string | null, query = '', method = 'GET') =>
    (method === 'GET' ? v1RunsRoute.GET : (v1RunsRoute as any)[method])(
      new Request(`http://localhost/api/v1/studies/${studyId}/releases/latest/runs${query}`, {
        method,
        headers: tok ? { authorization: `Bearer ${tok}` } : {},
      }),
      { params: Promise.resolve({ id: String(studyId) }) },
    ) as Promise<Response>;

  it('creates a token shown once and stored as sha256; a rater may not create one', async () => {
    actAs(u('rater1'));
    expect(
      (await callRoute(tokensRoute.POST, { method: 'POST', url: '/api/account/tokens', params: {}, body: { name: 'x' } })).status,
    ).toBe(403);
    actAs(u('observer'));
    const res = await callRoute(tokensRoute.POST, {
      method: 'POST',
      url: '/api/account/tokens',
      params: {},
      body: { name: 'lab pipeline' },
    });
    expect(res.status).toBe(201);
    token = res.json.token;
    tokenId = res.json.id;
    expect(token).toMatch(/^qrm_[A-Za-z0-9_-]{43}$/);
    const row = await db('personal_access_tokens').where({ id: tokenId }).first();
    expect(row.token_hash).toBe(sha(token));
    expect(row.scope).toBe('releases:read');
    const list = await callRoute(tokensRoute.GET, { url: '/api/account/tokens', params: {} });
    expect(JSON.stringify(list.json)).not.toContain(token);
    expect(JSON.stringify(list.json)).not.toContain(row.token_hash);
  });

  it("fetches the latest release's noise lists by entities and a file, and records last_used_at", async () => {
    const res = await v1(token, '?sub=rel02&task=rest');
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.release.version).toBe(2);
    expect(body.runs).toHaveLength(1);
    const r = body.runs[0];
    expect(r.entities).toMatchObject({ sub: 'rel02', ses: '1', task: 'rest' });
    expect(r.k).toBe(8);
    const frozen = await db('release_decisions')
      .where({ release_id: body.release.id, run_id: r.runId, label: 'noise' })
      .orderBy('idx')
      .pluck('idx');
    expect(r.noise).toEqual(frozen);
    const txtName = Object.keys(r.files).find((n) => n.endsWith('.txt'))!;
    const url = new URL(r.files[txtName].url);
    const [, , , , relId, , name] = url.pathname.split('/');
    const file = await v1FileRoute.GET(new Request(url, { headers: { authorization: `Bearer ${token}` } }), {
      params: Promise.resolve({ releaseId: relId!, name: name! }),
    });
    expect(file.status).toBe(200);
    expect((await file.text()).trim()).toBe(frozen.join(','));
    expect((await db('personal_access_tokens').where({ id: tokenId }).first()).last_used_at).toBeInstanceOf(Date);
  });

  it("names each run's own latest release (a later single-run release supersedes the study release for that run) and lists and serves denoised files", async () => {
    const body = await (await v1(token)).json();
    const newestWith = async (runId: number) =>
      Number(((await db('release_decisions').where({ run_id: runId }).max('release_id as id').first()) as { id: number }).id);
    for (const run of runs) {
      const entry = body.runs.find((r: any) => r.runId === run.runId);
      const expected = await db('releases')
        .where({ id: await newestWith(run.runId) })
        .first('id', 'version', 'run_id');
      expect(entry.release).toMatchObject({ id: expected.id, version: expected.version, scope: expected.run_id ? 'run' : 'study' });
      expect(entry.noise).toEqual(
        await db('release_decisions').where({ release_id: expected.id, run_id: run.runId, label: 'noise' }).orderBy('idx').pluck('idx'),
      );
    }
    expect(body.runs.find((r: any) => r.runId === runs[0]!.runId).release.scope).toBe('run');
    // the full regression with motion (previous describe) was made from the latest study release of rel02
    const rel02 = body.runs.find((r: any) => r.runId === runs[1]!.runId);
    expect(rel02.release.scope).toBe('study');
    const job = await db('jobs')
      .where({ kind: 'denoise', run_id: runs[1]!.runId, status: 'succeeded' })
      .orderBy('id', 'desc')
      .first('result');
    const result = typeof job.result === 'string' ? JSON.parse(job.result) : job.result;
    expect(result.name).toBe('sub-rel02_ses-1_task-rest_desc-denoisedfullmotion_bold.nii.gz');
    expect(rel02.denoised).toEqual([
      expect.objectContaining({ name: result.name, mode: 'full', includeMotion: true, sha256: result.sha256, bytes: result.bytes }),
    ]);
    expect(rel02.files[result.name].sha256).toBe(result.sha256);
    const url = new URL(rel02.denoised[0].url);
    const [, , , , relId, , name] = url.pathname.split('/');
    const file = await v1FileRoute.GET(new Request(url, { headers: { authorization: `Bearer ${token}` } }), {
      params: Promise.resolve({ releaseId: relId!, name: decodeURIComponent(name!) }),
    });
    expect(file.status).toBe(200);
    expect(sha(await bytesOf(file))).toBe(result.sha256);
    // and the release itself lists it for the release page
    actAs(u('observer'));
    const one = await callRoute(releaseRoute.GET, { url: `/api/releases/${relId}`, params: { releaseId: relId! } });
    expect(one.json.denoised.map((f: any) => f.name)).toContain(result.name);
    expect(JSON.stringify(one.json.denoised)).not.toContain('"key"');
  });

  it('refuses a missing or wrong token (401), a token trying to write (405), a session alone (401), another study (404), and a revoked token (401)', async () => {
    expect((await v1(null)).status).toBe(401);
    expect((await v1('qrm_not-a-token')).status).toBe(401);
    for (const m of ['POST', 'PUT', 'PATCH', 'DELETE']) {
      const res = await v1(token, '', m);
      expect(res.status, m).toBe(405);
      expect((await res.json()).error.message).toMatch(/read-only/);
    }
    actAs(u('lead'));
    expect((await v1(null)).status).toBe(401);
    const outside = await v1RunsRoute.GET(new Request('http://localhost/x', { headers: { authorization: `Bearer ${token}` } }), {
      params: Promise.resolve({ id: '999999' }),
    });
    expect(outside.status).toBe(404);
    actAs(u('lead'));
    expect(
      (
        await callRoute(tokenRoute.DELETE, {
          method: 'DELETE',
          url: `/api/account/tokens/${tokenId}`,
          params: { tokenId: String(tokenId) },
        })
      ).status,
    ).toBe(404); // not the lead's token
    actAs(u('observer'));
    expect(
      (
        await callRoute(tokenRoute.DELETE, {
          method: 'DELETE',
          url: `/api/account/tokens/${tokenId}`,
          params: { tokenId: String(tokenId) },
        })
      ).status,
    ).toBe(200);
    const revoked = await v1(token);
    expect(revoked.status).toBe(401);
    expect((await revoked.json()).error.message).toMatch(/revoked/);
  });
});

describe('a release job that can no longer go through', () => {
  const newest = async () => Number((await db('releases').where({ study_id: studyId, run_key: 0 }).max('version as v').first())?.v);

  it('a decision reopened after the request: the job fails at once with the reason, and nothing is released', async () => {
    actAs(u('lead'));
    const before = await newest();
    const asked = await release();
    expect(asked.status, JSON.stringify(asked.json)).toBe(202);
    const componentId = runs[0]!.componentIds[0]!;
    const kept = await db('decisions').where({ component_id: componentId }).first('label', 'noise_kind', 'method');
    await db('decisions').where({ component_id: componentId }).update({ label: null, noise_kind: null, method: 'pending' });
    try {
      const res = await buildRequestedRelease(db, asked);
      expect(res.json.jobStatus).toBe('failed');
      expect(res.json.jobMessage).toMatch(/have no final decision yet \(1 pending/);
      expect(await db('jobs').where({ id: asked.json.jobId }).first('attempts')).toEqual({ attempts: 1 }); // not retried
      expect(await newest()).toBe(before);
    } finally {
      await db('decisions').where({ component_id: componentId }).update(kept);
    }
  });

  it('component maps whose size no longer matches the stored checksum: the job fails saying what to do', async () => {
    actAs(u('lead'));
    const before = await newest();
    const dec = await db('decompositions').where({ run_id: runs[0]!.runId, is_current: true }).first('id', 'components_bytes');
    expect(dec.components_bytes).not.toBeNull(); // kept by the first release
    await db('decompositions')
      .where({ id: dec.id })
      .update({ components_bytes: Number(dec.components_bytes) + 1 });
    try {
      const res = await buildRequestedRelease(db, await release());
      expect(res.json.jobStatus).toBe('failed');
      expect(res.json.jobMessage).toContain(
        `The component maps of run ${runs[0]!.runId} are ${dec.components_bytes} bytes on storage but ${Number(dec.components_bytes) + 1} bytes were stored`,
      );
      expect(res.json.jobMessage).toContain('decompose the run again');
      expect(await newest()).toBe(before);
    } finally {
      await db('decompositions').where({ id: dec.id }).update({ components_bytes: dec.components_bytes });
    }
  });
});

describe('runs whose files would share names', () => {
  it('refuses a release when two runs have the same BIDS entities, naming both', async () => {
    const twin = await createReadyRun(db, {
      studyId,
      createdBy: u('lead'),
      raterIds: [u('rater1')],
      size: 'tiny',
      seed: 31,
      sub: 'rel01',
      components: 4,
    });
    for (const componentId of twin.componentIds)
      await db('decisions').insert({ component_id: componentId, run_id: twin.runId, label: 'signal', method: 'unanimous' });
    actAs(u('lead'));
    const res = await release();
    expect(res.status).toBe(409);
    expect(res.json.error.message).toContain(
      `Runs ${runs[0]!.runId} and ${twin.runId} have the same BIDS entities (sub-rel01_ses-1_task-rest)`,
    );
    expect(await db('releases').where({ study_id: studyId, run_key: 0 }).max('version as v').first()).toMatchObject({ v: 2 });
  });
});
