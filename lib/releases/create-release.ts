import 'server-only';
/**
 * Releasing a study (or one run), in two steps (issue 12 item 3):
 * - requestRelease (the request): checks the lead, the scope and that every component in scope has
 *   a final decision, then queues a `release` job (lib/worker/kinds/release.ts), or returns the open
 *   one of the same scope, so two clicks make one release.
 * - buildRelease (the worker): takes the component maps' stored checksums (hashing once the ones
 *   stored before checksums were kept), computes the agreement report with its bootstrap outside
 *   any transaction, then, in the transaction that completes the job (the study row locked, so
 *   versions never collide), freezes the decisions into release_decisions under the next version
 *   number, writes the release's text files to a fresh storage directory hashing each one, stores
 *   the manifest and the report and appends the audit entry. Old releases stay as they were.
 */
import { createHash } from 'node:crypto';
import { writeFile } from 'node:fs/promises';
import { enqueueJob, JobError } from '@/lib/jobs';
import { checksumOfKey } from '@/lib/storage/checksum';
import type { ReleasePayload } from '@/lib/jobs/release-payload';
import { markJobWaiting } from '@/lib/db/queries/jobs';
import { inTransaction, type Trx } from '@/lib/db/transaction';
import { bidsName } from '@/lib/bids';
import { AppError, forbidden, notFound } from '@/lib/errors';
import type { UserRow } from '@/lib/db/queries/users';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { leadsStudy } from '@/lib/auth/permissions';
import { recordAudit } from '@/lib/db/queries/audit';
import { loadRatingFacts, loadStudyRatings, type RatingFacts } from '@/lib/db/queries/agreement';
import {
  findReleaser,
  insertRelease,
  insertReleaseDecisions,
  lastReleaseVersion,
  loadExportRuns,
  lockStudy,
  lockStudyRow,
  openReleaseJob,
  raterNames,
  releaseReadiness,
  runInStudy,
  storeMapChecksum,
  storeReleaseManifest,
  type ExportRun,
  type ManifestFile,
  type ManifestRun,
  type ReleaseManifest,
  type Readiness,
} from '@/lib/db/queries/releases';
import { buildAgreementReport } from '@/lib/reports/agreement-report';
import { agreementReportCsv } from '@/lib/reports/agreement-csv';
import { methodsMarkdown, type MethodsInput } from '@/lib/reports/methods-paragraph';
import { CAUTIONS, EXPORT_CAUTION } from '@/lib/exports/cautions';
import { noiseList, type UncertainPolicy } from '@/lib/exports/noise-list';
import { FEATURE_COLUMNS, featureColumnName, featureColumns, mapFileName, runExportFiles, type TextFile } from '@/lib/exports/run-files';
import { toTsv } from '@/lib/exports/tabular';
import { EXPORT_FORMAT, EXPORT_FORMAT_SIDECAR } from '@/lib/exports/format';
import { childKey, ensureDirFor, newKey, removeKey, sizeOf } from '@/lib/storage';
import { SOFTWARE_VERSION } from './version';
import { activeSuggestionModel } from '@/lib/db/queries/suggestions';
import { suggestionModelDocument } from '@/lib/suggestions/model-document';

export const BOOTSTRAP = { resamples: 1000, seed: 1 } as const;

/** Why a scope cannot be released yet, in words a lead can act on (null when it can). */
export function refusalOf(r: Readiness, studyId: number): string | null {
  if (r.runs === 0) return 'There is nothing to release: no run in scope has a finished decomposition.';
  const waiting = r.pending + r.undecided;
  if (waiting > 0) {
    return (
      `${waiting} of ${r.components} components have no final decision yet (${r.pending} pending, ${r.undecided} without votes). ` +
      `Decide them in Reconcile (/studies/${studyId}/reconcile) or wait for the raters, then release.`
    );
  }
  if (r.reopened.length > 0) {
    const who = r.reopened.map((x) => `${x.raterName} (run ${x.runId})`).join(', ');
    return (
      `A lead reopened ${r.reopened.length === 1 ? 'a run' : 'runs'} for ${who}, who ${r.reopened.length === 1 ? 'has' : 'have'} not submitted again: ` +
      'their votes may still change the decisions. Release once they have submitted, or take the run from them on the study page.'
    );
  }
  return null;
}

const sha256 = (text: string | Buffer) => createHash('sha256').update(text).digest('hex');

type MapChecksum = { sha256: string; bytes: number };

/**
 * The component-map checksum of a run's decomposition: the one stored with it, after checking the
 * file still has the stored size (a full re-hash would cost what storing it saved); hashed once and
 * stored when the decomposition predates stored checksums.
 */
async function mapChecksum(r: ExportRun): Promise<MapChecksum> {
  if (r.componentsSha256 && r.componentsBytes != null) {
    const bytes = await sizeOf(r.componentsKey!);
    if (bytes !== r.componentsBytes) {
      throw new AppError(
        'conflict',
        `The component maps of run ${r.runId} are ${bytes} bytes on storage but ${r.componentsBytes} bytes were stored with its decomposition; decompose the run again, then release.`,
      );
    }
    return { sha256: r.componentsSha256, bytes };
  }
  const c = await checksumOfKey(r.componentsKey!);
  await storeMapChecksum(r.decompositionId, c);
  return c;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length ? (s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2) : 0;
};
const uniq = <T>(xs: T[]) => [...new Set(xs.filter((x) => x !== undefined && x !== null))] as T[];

/** The methods paragraph input from the frozen runs and the report. */
export function methodsInputOf(
  runs: ExportRun[],
  study: Record<string, unknown>,
  report: ReturnType<typeof buildAgreementReport>,
  ratings: RatingFacts,
): MethodsInput {
  const p = runs.map((r) => r.parameters);
  const num = (v: unknown) => (typeof v === 'number' ? v : null);
  const voteCounts = runs.flatMap((r) => r.components.map((c) => c.votes.length));
  return {
    software: SOFTWARE_VERSION,
    runs: runs.length,
    components: runs.reduce((a, r) => a + r.components.length, 0),
    k: { min: Math.min(...runs.map((r) => r.k)), max: Math.max(...runs.map((r) => r.k)), median: median(runs.map((r) => r.k)) },
    decomposition: {
      dimMethods: uniq(
        p
          .map((x) => String(x.dimMethodUsed ?? x.dimMethod ?? study.dim_method ?? 'laplace'))
          .map((x) => (x.startsWith('{') || x.includes('variance') ? 'variance' : x)),
      ),
      contrasts: uniq(p.map((x) => String(x.contrast ?? 'logcosh'))),
      tolerance: num(p[0]?.tol) ?? 1e-4,
      maxIter: num(p[0]?.maxIter) ?? 200,
      dropVolumes: uniq(
        runs.map((r) => Number(r.summary.droppedVolumes ?? r.parameters.dropVolumes ?? r.parameters.drop ?? study.drop_volumes ?? 0)),
      ),
      varianceNorm: p[0]?.varianceNorm == null ? Boolean(study.variance_norm) : Boolean(p[0].varianceNorm),
      detrend: p[0]?.detrend == null ? Boolean(study.detrend) : Boolean(p[0].detrend),
      masks: uniq(p.map((x) => (x.mask === 'uploaded' ? 'uploaded' : 'automatic'))),
    },
    ratersPerRun: Number(study.raters_per_run ?? 2),
    votesPerComponent: {
      min: Math.min(...voteCounts),
      max: Math.max(...voteCounts),
      mean: voteCounts.reduce((a, b) => a + b, 0) / Math.max(1, voteCounts.length),
    },
    consensusRule: (study.consensus_rule as MethodsInput['consensusRule']) ?? 'majority',
    labelSet: (typeof study.label_set === 'string' ? JSON.parse(study.label_set) : study.label_set) as string[],
    uncertainInExport: (study.uncertain_in_export as UncertainPolicy) ?? 'keep',
    report,
    bootstrap: { ...BOOTSTRAP },
    ratings,
  };
}

export type CreatedRelease = { releaseId: number; version: number; manifest: ReleaseManifest };

/**
 * The request: a lead asks for a release of the study (or one run). Refuses (409) with the reason
 * when decisions are incomplete; otherwise queues the release job, or returns the open job of the
 * same scope (`existing: true`) so a second click makes no second release.
 */
export async function requestRelease({
  user,
  studyId,
  runId = null,
  notes = null,
  ip = null,
}: {
  user: Pick<UserRow, 'id' | 'role' | 'name'>;
  studyId: number;
  runId?: number | null;
  notes?: string | null;
  ip?: string | null;
}): Promise<{ jobId: number; existing: boolean }> {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw forbidden('releasing this study (only its leads may)');
  if (runId != null) {
    if (!(await runInStudy({ studyId, runId }))) throw notFound('The run');
  }
  return inTransaction(async (trx) => {
    if (!(await lockStudy(trx, studyId))) throw notFound('The study');
    const open = await openReleaseJob({ studyId, runId }, trx);
    if (open) return { jobId: open, existing: true };
    const refusal = refusalOf(await releaseReadiness({ studyId, runId }, trx), studyId);
    if (refusal) throw new AppError('conflict', refusal);
    const clash = nameClash(await loadExportRuns({ studyId, runId }, trx, { timecourses: false }));
    if (clash) throw new AppError('conflict', clash);
    const jobId = await enqueueJob(trx, { kind: 'release', payload: { studyId, runId, notes, ip }, studyId, createdBy: user.id });
    await markJobWaiting(trx, jobId);
    return { jobId, existing: false };
  });
}

/** Why the runs' files would collide (two runs with the same BIDS entities), or null. */
function nameClash(runs: Pick<ExportRun, 'runId' | 'sub' | 'ses' | 'task' | 'acq' | 'runLabel'>[]): string | null {
  const seen = new Map<string, number>();
  for (const r of runs) {
    const stem = bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel });
    const other = seen.get(stem);
    if (other !== undefined)
      return `Runs ${other} and ${r.runId} have the same BIDS entities (${stem}), so their files would share names; correct the labels of one of them on the study page, then release.`;
    seen.set(stem, r.runId);
  }
  return null;
}

/** What buildRelease needs from the job running it (lib/jobs' JobContext fits). */
export interface ReleaseJobHooks {
  progress(stage: string, percent: number): Promise<void>;
  /** Runs `write` in the transaction that completes the job. */
  commit(write: (trx: Trx) => Promise<CreatedRelease>): Promise<CreatedRelease>;
}

/** The worker's part: builds the release a request queued. Throws AppError (conflict) when the scope can no longer be released. */
export async function buildRelease(p: ReleasePayload & { actorId: number }, job: ReleaseJobHooks): Promise<CreatedRelease> {
  const { studyId, runId, notes, ip } = p;
  const user = await findReleaser({ userId: p.actorId });
  if (!user) throw new AppError('conflict', 'The lead who asked for this release no longer has an account; ask again.');
  await job.progress('checking', 2);
  const refusal = refusalOf(await releaseReadiness({ studyId, runId }), studyId);
  if (refusal) throw new AppError('conflict', refusal);

  // the heavy part, outside any transaction: map checksums and the agreement report's bootstrap
  const planned = await loadExportRuns({ studyId, runId }, undefined, { timecourses: false });
  const maps = new Map<number, MapChecksum>();
  for (const [i, r] of planned.entries()) {
    if (r.componentsKey) maps.set(r.runId, await mapChecksum(r));
    await job.progress('checksums', 5 + (35 * (i + 1)) / planned.length);
  }
  await job.progress('statistics', 40);
  const runIds = planned.map((r) => r.runId);
  const report = buildAgreementReport(await loadStudyRatings({ studyId, runIds }), BOOTSTRAP);
  const facts = await loadRatingFacts({ studyId, runIds });
  await job.progress('writing', 80);

  const dirKey = newKey('releases');
  try {
    return await job.commit(async (trx) => {
      const study = await lockStudyRow(trx, studyId);
      if (!study) throw new AppError('conflict', 'The study no longer exists.');
      const readiness = await releaseReadiness({ studyId, runId }, trx);
      const again = refusalOf(readiness, studyId);
      if (again) throw new AppError('conflict', again);
      const runs = await loadExportRuns({ studyId, runId }, trx);
      const same =
        runs.length === planned.length &&
        runs.every((r, i) => r.runId === planned[i]!.runId && r.decompositionId === planned[i]!.decompositionId);
      if (!same)
        throw new JobError(
          'The study changed while its release was being built (a run was added, removed or decomposed again); building it again.',
        );
      const version = (await lastReleaseVersion(trx, { studyId, runId })) + 1;
      const { releaseId, releasedAt } = await insertRelease(trx, { studyId, runId, version, releasedBy: user.id, notes });
      const clash = nameClash(runs);
      if (clash) throw new AppError('conflict', clash);
      const rows = runs.flatMap((r) =>
        r.components.map((c) => ({
          release_id: releaseId,
          component_id: c.componentId,
          run_id: r.runId,
          idx: c.idx,
          label: c.label!,
          noise_kind: c.noiseKind,
          method: c.method as never,
        })),
      );
      await insertReleaseDecisions(trx, rows);
      const manifest = await writeReleaseFiles(trx, {
        dirKey,
        study,
        runs,
        maps,
        report,
        facts,
        releaseId,
        version,
        releasedAt: releasedAt.toISOString(),
        user,
        runId,
        notes,
        excluded: runId ? [] : readiness.notReady,
      });
      await storeReleaseManifest(trx, { releaseId, manifest, report });
      await recordAudit(
        {
          actorId: user.id,
          action: 'release.create',
          targetType: 'release',
          targetId: releaseId,
          studyId,
          ip,
          detail: {
            version,
            runId,
            runs: runs.length,
            components: rows.length,
            files: manifest.files.length,
            noise: manifest.runs.reduce((a, r) => a + r.noise.length, 0),
          },
        },
        trx,
      );
      return { releaseId, version, manifest };
    });
  } catch (err) {
    await removeKey(dirKey).catch(() => undefined);
    throw err;
  }
}

async function writeReleaseFiles(
  trx: Trx,
  o: {
    dirKey: string;
    study: Record<string, unknown>;
    runs: ExportRun[];
    maps: Map<number, MapChecksum>;
    report: ReturnType<typeof buildAgreementReport>;
    facts: RatingFacts;
    releaseId: number;
    version: number;
    releasedAt: string;
    user: Pick<UserRow, 'id' | 'name'>;
    runId: number | null;
    notes: string | null;
    excluded: { runId: number; status: string }[];
  },
): Promise<ReleaseManifest> {
  const studyId = Number(o.study.id);
  const labelSet = (typeof o.study.label_set === 'string' ? JSON.parse(o.study.label_set as string) : o.study.label_set) as string[];
  const policy = (o.study.uncertain_in_export as UncertainPolicy) ?? 'keep';
  const stamp = { studyId, releaseId: o.releaseId, version: o.version, releasedAt: o.releasedAt, software: SOFTWARE_VERSION };
  const raterIds = [...new Set(o.runs.flatMap((r) => r.components.flatMap((c) => c.votes.map((v) => v.raterId))))].sort((a, b) => a - b);
  const names = await raterNames(trx, raterIds);
  const codeOf = new Map(raterIds.map((id, i) => [id, `R${i + 1}`]));
  const files: ManifestFile[] = [];

  const put = async (dir: string, f: TextFile, runId: number | null) => {
    const key = childKey(o.dirKey, f.name);
    await writeFile(await ensureDirFor(key), f.content);
    files.push({
      path: dir ? `${dir}/${f.name}` : f.name,
      name: f.name,
      sha256: sha256(f.content),
      bytes: Buffer.byteLength(f.content),
      runId,
      key,
    });
  };

  const manifestRuns: ManifestRun[] = [];
  const training: (string | number | null)[][] = [];
  const featureKeys = Object.keys(FEATURE_COLUMNS);
  for (const r of o.runs) {
    const entities = { sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, run: r.runLabel };
    const stem = bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel });
    const dir = [`sub-${r.sub}`, r.ses ? `ses-${r.ses}` : null].filter(Boolean).join('/');
    const comps = r.components.map((c) => ({
      ...c,
      votes: c.votes.map((v) => ({ raterCode: codeOf.get(v.raterId)!, label: v.label, noiseKind: v.noiseKind })),
    }));
    for (const f of runExportFiles({
      stem,
      entities,
      trSeconds: r.trSeconds,
      labelSet,
      uncertainInExport: policy,
      components: comps,
      release: stamp,
    }))
      await put(dir, f, r.runId);
    const h = o.maps.get(r.runId);
    if (r.componentsKey && h) {
      files.push({ path: `${dir}/${mapFileName(stem)}`, name: mapFileName(stem), ...h, runId: r.runId, key: r.componentsKey });
    }
    const counts: Record<string, number> = {};
    for (const c of r.components) counts[c.label ?? 'none'] = (counts[c.label ?? 'none'] ?? 0) + 1;
    manifestRuns.push({
      runId: r.runId,
      stem,
      entities,
      k: r.k,
      timepoints: r.components[0]?.timecourse?.length ?? 0,
      trSeconds: r.trSeconds,
      decompositionId: r.decompositionId,
      parameters: r.parameters,
      noise: noiseList(r.components, policy),
      counts,
    });
    for (const c of r.components)
      training.push([
        r.sub,
        r.ses,
        r.task,
        r.acq,
        r.runLabel,
        c.idx,
        ...featureKeys.map((k) => c.features[k] ?? null),
        c.varianceExplained,
        c.label,
        c.noiseKind,
        c.method,
      ]);
  }

  // study-level files
  const prefix = `study-${studyId}`;
  const sidecarMeta = {
    GeneratedBy: { Name: 'Quorum', Version: SOFTWARE_VERSION },
    Release: { StudyId: studyId, ReleaseId: o.releaseId, Version: o.version, ReleasedAt: o.releasedAt },
    Caution: EXPORT_CAUTION,
    ...EXPORT_FORMAT_SIDECAR,
  };
  const js = (v: unknown) => JSON.stringify(v, null, 2) + '\n';
  await put(
    '',
    {
      name: `${prefix}_desc-raters_table.tsv`,
      content: toTsv(
        ['rater', 'name', 'votes'],
        raterIds.map((id) => [
          codeOf.get(id)!,
          names.get(id) ?? `user ${id}`,
          o.runs.reduce((a, r) => a + r.components.reduce((b, c) => b + c.votes.filter((v) => v.raterId === id).length, 0), 0),
        ]),
      ),
    },
    null,
  );
  await put(
    '',
    {
      name: `${prefix}_desc-raters_table.json`,
      content: js({
        rater: { Description: 'Rater code used in the rater_labels column of the desc-decisions tables.' },
        name: { Description: "The rater's name in Quorum." },
        votes: { Description: 'Submitted votes of the rater in this release.' },
        Description: 'The raters whose submitted votes are in this release.',
        ...sidecarMeta,
      }),
    },
    null,
  );
  const entityCols = ['sub', 'ses', 'task', 'acq', 'run'];
  await put(
    '',
    {
      name: `${prefix}_desc-trainingset_features.tsv`,
      content: toTsv(
        [...entityCols, 'component', ...featureKeys.map(featureColumnName), 'variance_explained', 'label', 'noise_kind', 'decided_by'],
        training,
      ),
    },
    null,
  );
  await put(
    '',
    {
      name: `${prefix}_desc-trainingset_features.json`,
      content: js({
        ...Object.fromEntries(
          entityCols.map((e) => [e, { Description: `BIDS "${e}" entity of the run (label without the "${e}-" prefix; n/a when absent).` }]),
        ),
        ...featureColumns(labelSet),
        Description:
          'Every released component of the study with its features and decision, one row per component: a training table for automatic classifiers.',
        ...sidecarMeta,
      }),
    },
    null,
  );

  const report = o.report;
  const nameOf = (id: string) => `${codeOf.get(Number(id)) ?? id} (${names.get(Number(id)) ?? 'rater'})`;
  await put(
    '',
    {
      name: `${prefix}_desc-agreement_report.json`,
      content: js({
        Description: 'Inter-rater agreement of the released runs (statistics with percentile-bootstrap 95% CIs over components).',
        bootstrap: BOOTSTRAP,
        raterCodes: Object.fromEntries(raterIds.map((id) => [String(id), codeOf.get(id)])),
        report,
        ...sidecarMeta,
      }),
    },
    null,
  );
  await put('', { name: `${prefix}_desc-agreement_report.csv`, content: agreementReportCsv(report, nameOf) }, null);
  const suggestionModel = await activeSuggestionModel({ studyId }, trx);
  if (suggestionModel)
    await put(
      '',
      { name: `${prefix}_desc-suggestions_model.json`, content: js({ ...suggestionModelDocument(suggestionModel), ...sidecarMeta }) },
      null,
    );
  await put(
    '',
    { name: `${prefix}_desc-methods_report.md`, content: methodsMarkdown(methodsInputOf(o.runs, o.study, report, o.facts)) },
    null,
  );

  return {
    format: EXPORT_FORMAT,
    study: { id: studyId, name: String(o.study.name) },
    release: {
      id: o.releaseId,
      version: o.version,
      scope: o.runId ? 'run' : 'study',
      runId: o.runId,
      releasedAt: o.releasedAt,
      releasedBy: { id: o.user.id, name: o.user.name },
      notes: o.notes,
    },
    software: { name: 'Quorum', version: SOFTWARE_VERSION },
    cautions: CAUTIONS,
    protocol: {
      ratersPerRun: o.study.raters_per_run,
      consensusRule: o.study.consensus_rule,
      labelSet,
      blinding: Boolean(o.study.blinding),
      dropVolumes: o.study.drop_volumes,
      dimMethod: o.study.dim_method,
      fixedComponents: o.study.fixed_components,
      varianceFraction: o.study.variance_fraction,
      varianceNorm: Boolean(o.study.variance_norm),
      detrend: Boolean(o.study.detrend),
    },
    uncertainInExport: policy,
    raters: raterIds.map((id) => ({ code: codeOf.get(id)!, name: names.get(id) ?? `user ${id}` })),
    runs: manifestRuns,
    excludedRuns: o.excluded,
    files,
  };
}

/** The manifest as shipped and served: storage keys removed. */
export function publicManifest(m: ReleaseManifest) {
  return { ...m, files: m.files.map(({ key: _key, ...f }) => f) };
}
