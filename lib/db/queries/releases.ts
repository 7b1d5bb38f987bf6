import 'server-only';
import type { Knex } from 'knex';
import { blobToFloat32, db, parseJson, toJson } from '@/lib/db/knex';

export type ReleaseScope = { studyId: number; runId?: number | null };

/** Runs a release of this scope covers: the study's non-calibration runs (or the one run) with a current decomposition. */
function scopedRuns(q: Knex, s: ReleaseScope) {
  const base = q('runs as r')
    .join('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', q.raw('1'));
    })
    .where('r.study_id', s.studyId)
    .where('r.is_calibration', false);
  return s.runId ? base.where('r.id', s.runId) : base;
}

export type Readiness = {
  runs: number;
  components: number;
  pending: number;
  /** Components with no decision row at all (no votes yet). */
  undecided: number;
  /** Runs of the study that are not ready (still decomposing, failed): not part of a study release. */
  notReady: { runId: number; status: string }[];
  /** Raters a lead reopened a run for who have not submitted it again (their votes may still change). */
  reopened: { runId: number; raterName: string }[];
};

/** Whether every component in the scope has a final decision (none pending, none missing). */
export async function releaseReadiness(s: ReleaseScope, q: Knex | Knex.Transaction = db): Promise<Readiness> {
  const row = await scopedRuns(q as Knex, s)
    .join('components as c', 'c.decomposition_id', 'd.id')
    .leftJoin('decisions as x', 'x.component_id', 'c.id')
    .first(
      q.raw('COUNT(DISTINCT r.id) as runs'),
      q.raw('COUNT(c.id) as components'),
      q.raw("SUM(CASE WHEN x.id IS NOT NULL AND (x.method = 'pending' OR x.label IS NULL) THEN 1 ELSE 0 END) as pending"),
      q.raw('SUM(CASE WHEN x.id IS NULL THEN 1 ELSE 0 END) as undecided'),
    );
  const notReadyQ = q('runs')
    .where({ study_id: s.studyId, is_calibration: false })
    .whereNot('status', 'ready')
    .select('id as runId', 'status');
  const notReady = s.runId ? await notReadyQ.where('id', s.runId) : await notReadyQ;
  const reopenedQ = q('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('users as u', 'u.id', 'a.rater_id')
    .where({ 'r.study_id': s.studyId, 'r.is_calibration': false })
    .whereNotNull('a.reopened_at')
    .whereNull('a.submitted_at')
    .orderBy(['a.run_id', 'u.name'])
    .select('a.run_id as runId', 'u.name as raterName');
  const reopened = s.runId ? await reopenedQ.where('a.run_id', s.runId) : await reopenedQ;
  return {
    runs: Number(row?.runs ?? 0),
    components: Number(row?.components ?? 0),
    pending: Number(row?.pending ?? 0),
    undecided: Number(row?.undecided ?? 0),
    notReady: notReady.map((r: { runId: number; status: string }) => ({ runId: Number(r.runId), status: r.status })),
    reopened: reopened.map((r: { runId: number; raterName: string }) => ({ runId: Number(r.runId), raterName: String(r.raterName) })),
  };
}

/** Per run of the study (non-calibration, with a current decomposition): components and how many still wait. */
export async function runReadiness({ studyId }: { studyId: number }): Promise<
  {
    runId: number;
    sub: string;
    ses: string | null;
    task: string | null;
    acq: string | null;
    runLabel: string | null;
    components: number;
    waiting: number;
  }[]
> {
  const rows = await scopedRuns(db, { studyId })
    .join('components as c', 'c.decomposition_id', 'd.id')
    .leftJoin('decisions as x', 'x.component_id', 'c.id')
    .groupBy('r.id', 'r.sub', 'r.ses', 'r.task', 'r.acq', 'r.run_label')
    .orderBy(['r.sub', 'r.ses', 'r.task', 'r.run_label', 'r.id'])
    .select(
      'r.id as runId',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      db.raw('COUNT(c.id) as components'),
      db.raw("SUM(CASE WHEN x.id IS NULL OR x.method = 'pending' OR x.label IS NULL THEN 1 ELSE 0 END) as waiting"),
    );
  return rows.map((r: Record<string, unknown>) => ({
    runId: Number(r.runId),
    sub: String(r.sub),
    ses: (r.ses as string) ?? null,
    task: (r.task as string) ?? null,
    acq: (r.acq as string) ?? null,
    runLabel: (r.runLabel as string) ?? null,
    components: Number(r.components),
    waiting: Number(r.waiting),
  }));
}

export type ExportRun = {
  runId: number;
  sub: string;
  ses: string | null;
  task: string | null;
  acq: string | null;
  runLabel: string | null;
  trSeconds: number | null;
  motionKey: string | null;
  decompositionId: number;
  parameters: Record<string, unknown>;
  summary: Record<string, unknown>;
  componentsKey: string | null;
  /** SHA-256 and size of the component-map file, stored with the decomposition (null for older ones). */
  componentsSha256: string | null;
  componentsBytes: number | null;
  maskKey: string | null;
  k: number;
  components: {
    componentId: number;
    idx: number;
    varianceExplained: number;
    features: Record<string, number | null>;
    timecourse: Float32Array | null;
    label: string | null;
    noiseKind: string | null;
    method: string;
    reason: string | null;
    votes: { raterId: number; label: string; noiseKind: string | null }[];
  }[];
};

/** Everything the export files of the scope need, read in the caller's transaction (the frozen snapshot). */
export async function loadExportRuns(
  s: ReleaseScope,
  q: Knex | Knex.Transaction = db,
  opts: { timecourses?: boolean } = {},
): Promise<ExportRun[]> {
  const runs = await scopedRuns(q as Knex, s)
    .orderBy(['r.sub', 'r.ses', 'r.task', 'r.run_label', 'r.id'])
    .select(
      'r.id as runId',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'r.tr_seconds as trSeconds',
      'r.motion_key as motionKey',
      'd.id as decompositionId',
      'd.parameters',
      'd.summary',
      'd.components_key as componentsKey',
      'd.components_sha256 as componentsSha256',
      'd.components_bytes as componentsBytes',
      'd.mask_key as maskKey',
      'd.k',
    );
  if (!runs.length) return [];
  const decIds = runs.map((r: { decompositionId: number }) => r.decompositionId);
  const comps = await q('components as c')
    .leftJoin('decisions as x', 'x.component_id', 'c.id')
    .whereIn('c.decomposition_id', decIds)
    .orderBy(['c.decomposition_id', 'c.idx'])
    .select(
      'c.id as componentId',
      'c.decomposition_id as decompositionId',
      'c.idx',
      'c.variance_explained as varianceExplained',
      'c.features',
      ...(opts.timecourses === false ? [] : ['c.timecourse']),
      'x.label',
      'x.noise_kind as noiseKind',
      'x.method',
      'x.reason',
    );
  const votes = await q('votes as v')
    .join('components as c', 'c.id', 'v.component_id')
    .join('assignments as a', function () {
      this.on('a.run_id', 'v.run_id').andOn('a.rater_id', 'v.rater_id');
    })
    .whereIn('c.decomposition_id', decIds)
    .whereNotNull('a.submitted_at')
    .select('v.component_id as componentId', 'v.rater_id as raterId', 'v.label', 'v.noise_kind as noiseKind');
  const votesOf = new Map<number, ExportRun['components'][number]['votes']>();
  for (const v of votes) {
    const list = votesOf.get(v.componentId) ?? [];
    list.push({ raterId: Number(v.raterId), label: v.label, noiseKind: v.noiseKind ?? null });
    votesOf.set(v.componentId, list);
  }
  return runs.map((r: Record<string, unknown>) => ({
    runId: Number(r.runId),
    sub: String(r.sub),
    ses: (r.ses as string) ?? null,
    task: (r.task as string) ?? null,
    acq: (r.acq as string) ?? null,
    runLabel: (r.runLabel as string) ?? null,
    trSeconds: r.trSeconds == null ? null : Number(r.trSeconds),
    motionKey: (r.motionKey as string) ?? null,
    decompositionId: Number(r.decompositionId),
    parameters: parseJson<Record<string, unknown>>(r.parameters, {}) ?? {},
    summary: parseJson<Record<string, unknown>>(r.summary, {}) ?? {},
    componentsKey: (r.componentsKey as string) ?? null,
    componentsSha256: (r.componentsSha256 as string) ?? null,
    componentsBytes: r.componentsBytes == null ? null : Number(r.componentsBytes),
    maskKey: (r.maskKey as string) ?? null,
    k: Number(r.k),
    components: comps
      .filter((c: { decompositionId: number }) => Number(c.decompositionId) === Number(r.decompositionId))
      .map((c: Record<string, unknown>) => ({
        componentId: Number(c.componentId),
        idx: Number(c.idx),
        varianceExplained: Number(c.varianceExplained),
        features: parseJson<Record<string, number | null>>(c.features, {}) ?? {},
        timecourse: opts.timecourses === false ? null : blobToFloat32(c.timecourse as Buffer | null),
        label: (c.label as string) ?? null,
        noiseKind: (c.noiseKind as string) ?? null,
        method: (c.method as string) ?? 'pending',
        reason: (c.reason as string) ?? null,
        votes: votesOf.get(Number(c.componentId)) ?? [],
      })),
  }));
}

export type ReleaseRow = {
  id: number;
  studyId: number;
  runId: number | null;
  version: number;
  releasedBy: number;
  releasedByName: string;
  releasedAt: Date;
  notes: string | null;
  manifest: ReleaseManifest | null;
};

export type ManifestFile = { path: string; name: string; sha256: string; bytes: number; runId: number | null; key: string };
export type ManifestRun = {
  runId: number;
  stem: string;
  entities: { sub: string; ses: string | null; task: string | null; acq: string | null; run: string | null };
  k: number;
  timepoints: number;
  trSeconds: number | null;
  decompositionId: number;
  parameters: Record<string, unknown>;
  noise: number[];
  counts: Record<string, number>;
};
export type ReleaseManifest = {
  /** 'quorum-release/1' for releases made before the desc-decisions rename (lib/exports/format.ts). */
  format: 'quorum-release/1' | 'quorum-release/2';
  study: { id: number; name: string };
  release: {
    id: number;
    version: number;
    scope: 'study' | 'run';
    runId: number | null;
    releasedAt: string;
    releasedBy: { id: number; name: string };
    notes: string | null;
  };
  software: { name: 'Quorum'; version: string };
  cautions: readonly string[];
  protocol: Record<string, unknown>;
  uncertainInExport: 'keep' | 'remove';
  raters: { code: string; name: string }[];
  runs: ManifestRun[];
  excludedRuns: { runId: number; status: string }[];
  files: ManifestFile[];
};

const RELEASE_COLUMNS = [
  'rl.id',
  'rl.study_id as studyId',
  'rl.run_id as runId',
  'rl.version',
  'rl.released_by as releasedBy',
  'u.name as releasedByName',
  'rl.released_at as releasedAt',
  'rl.notes',
  'rl.manifest',
];

function toRelease(r: Record<string, unknown>): ReleaseRow {
  return {
    id: Number(r.id),
    studyId: Number(r.studyId),
    runId: r.runId == null ? null : Number(r.runId),
    version: Number(r.version),
    releasedBy: Number(r.releasedBy),
    releasedByName: String(r.releasedByName ?? ''),
    releasedAt: r.releasedAt as Date,
    notes: (r.notes as string) ?? null,
    manifest: parseJson<ReleaseManifest>(r.manifest, null),
  };
}

/** Releases of a study, newest first (scope the study with findStudyAccess first). */
export async function listReleases({ studyId }: { studyId: number }): Promise<ReleaseRow[]> {
  const rows = await db('releases as rl')
    .join('users as u', 'u.id', 'rl.released_by')
    .where('rl.study_id', studyId)
    .orderBy('rl.id', 'desc')
    .select(RELEASE_COLUMNS);
  return rows.map(toRelease);
}

/** One release, or null. */
export async function findRelease({ releaseId }: { releaseId: number }): Promise<ReleaseRow | null> {
  const row = await db('releases as rl').join('users as u', 'u.id', 'rl.released_by').where('rl.id', releaseId).first(RELEASE_COLUMNS);
  return row ? toRelease(row) : null;
}

/** The frozen decisions of a release. */
export async function releaseDecisions({ releaseId }: { releaseId: number }) {
  return db('release_decisions')
    .where({ release_id: releaseId })
    .orderBy(['run_id', 'idx'])
    .select('component_id as componentId', 'run_id as runId', 'idx', 'label', 'noise_kind as noiseKind', 'method');
}

/** Components whose current decision differs from the latest release of the same scope (0 when none). */
export async function changedSinceRelease({ releaseId }: { releaseId: number }): Promise<number> {
  const row = await db('release_decisions as rd')
    .leftJoin('decisions as x', 'x.component_id', 'rd.component_id')
    .where('rd.release_id', releaseId)
    .where(function () {
      this.whereNull('x.id').orWhereRaw('NOT (x.label <=> rd.label)').orWhereRaw('NOT (x.noise_kind <=> rd.noise_kind)');
    })
    .first(db.raw('COUNT(*) as n'));
  return Number(row?.n ?? 0);
}

/** Stores the component-map checksum of a decomposition stored before checksums were kept. */
export async function storeMapChecksum(
  decompositionId: number,
  c: { sha256: string; bytes: number },
  q: Knex | Knex.Transaction = db,
): Promise<void> {
  await q('decompositions')
    .where({ id: decompositionId })
    .whereNull('components_sha256')
    .update({ components_sha256: c.sha256, components_bytes: c.bytes });
}

/** The open (queued or running) release job of a scope (of any scope when runId is undefined), if any: a second request joins it. */
export async function openReleaseJob({ studyId, runId }: ReleaseScope, q: Knex | Knex.Transaction = db): Promise<number | null> {
  const rows = await q('jobs')
    .where({ kind: 'release', study_id: studyId })
    .whereIn('status', ['queued', 'running'])
    .orderBy('id')
    .select('id', 'payload');
  const same = rows.find(
    (r: { payload: unknown }) =>
      runId === undefined || (parseJson<{ runId?: number | null }>(r.payload, {})?.runId ?? null) === (runId ?? null),
  );
  return same ? Number(same.id) : null;
}

/** Locks the study row for the rest of the transaction (releases of one study are requested one at a time). */
export async function lockStudy(trx: Knex.Transaction, studyId: number): Promise<boolean> {
  return Boolean(await trx('studies').where({ id: studyId }).forUpdate().first('id'));
}

/** The agreement report a release's job computed (JSON of lib/reports/agreement-report.ts), or null for older releases. */
export async function storedAgreementReport({ releaseId }: { releaseId: number }): Promise<unknown | null> {
  const row = await db('releases').where({ id: releaseId }).first('agreement_report');
  return row?.agreement_report ? parseJson(row.agreement_report, null) : null;
}

/** A release job of a study as its page follows it (null when there is no such job). */
export async function findReleaseJob({ studyId, jobId }: { studyId: number; jobId: number }) {
  const row = await db('jobs')
    .where({ id: jobId, kind: 'release', study_id: studyId })
    .first('id', 'status', 'stage', 'percent', 'message', 'result');
  if (!row) return null;
  return {
    jobId: Number(row.id),
    status: String(row.status) as 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled',
    stage: (row.stage as string | null) ?? null,
    percent: row.percent == null ? null : Number(row.percent),
    message: (row.message as string | null) ?? null,
    release: row.status === 'succeeded' ? parseJson<{ releaseId: number; version: number; files: number }>(row.result, null) : null,
  };
}

/** Whether the run belongs to the study. */
export async function runInStudy({ studyId, runId }: { studyId: number; runId: number }): Promise<boolean> {
  return Boolean(await db('runs').where({ id: runId, study_id: studyId }).first('id'));
}

/** The study row (every column), locked FOR UPDATE in the caller's transaction; undefined when it is gone. */
export async function lockStudyRow(trx: Knex.Transaction, studyId: number): Promise<Record<string, unknown> | undefined> {
  return trx('studies').where({ id: studyId }).forUpdate().first();
}

/** The highest release version of the scope (0: none yet). */
export async function lastReleaseVersion(trx: Knex.Transaction, { studyId, runId }: ReleaseScope): Promise<number> {
  const last = await trx('releases')
    .where({ study_id: studyId, run_key: runId ?? 0 })
    .max('version as v')
    .first();
  return Number(last?.v ?? 0);
}

/** Inserts a release row; returns its id and released_at (the database's clock). */
export async function insertRelease(
  trx: Knex.Transaction,
  r: { studyId: number; runId: number | null; version: number; releasedBy: number; notes: string | null },
): Promise<{ releaseId: number; releasedAt: Date }> {
  const [id] = await trx('releases').insert({
    study_id: r.studyId,
    run_id: r.runId,
    version: r.version,
    released_by: r.releasedBy,
    notes: r.notes,
  });
  const releaseId = Number(id);
  const released = await trx('releases').where({ id: releaseId }).first('released_at');
  return { releaseId, releasedAt: released.released_at as Date };
}

/** Freezes decisions into release_decisions (200 rows per insert). */
export async function insertReleaseDecisions(
  trx: Knex.Transaction,
  rows: Array<{
    release_id: number;
    component_id: number;
    run_id: number;
    idx: number;
    label: string;
    noise_kind: string | null;
    method: string;
  }>,
): Promise<void> {
  for (let i = 0; i < rows.length; i += 200) await trx('release_decisions').insert(rows.slice(i, i + 200));
}

export async function storeReleaseManifest(
  trx: Knex.Transaction,
  { releaseId, manifest, report }: { releaseId: number; manifest: unknown; report: unknown },
): Promise<void> {
  await trx('releases')
    .where({ id: releaseId })
    .update({ manifest: toJson(manifest), agreement_report: toJson(report) });
}

/** The id and name of the lead who asked for a release (undefined: no such account). */
export async function findReleaser({ userId }: { userId: number }): Promise<{ id: number; name: string } | undefined> {
  return db('users').where({ id: userId }).first('id', 'name');
}

/** The raters' names by id. */
export async function raterNames(trx: Knex.Transaction, raterIds: number[]): Promise<Map<number, string>> {
  return new Map<number, string>(
    (await trx('users').whereIn('id', raterIds).select('id', 'name')).map((u: { id: number; name: string }) => [Number(u.id), u.name]),
  );
}
