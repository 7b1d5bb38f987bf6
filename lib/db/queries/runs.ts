import 'server-only';
import type { Knex } from 'knex';
import { db, parseJson } from '@/lib/db/knex';
import { decompositionWarnings, type DecompositionWarning } from '@/lib/decomposition/warnings';
import type { UserRow } from './users';
import type { JobStatus } from '@/lib/db/job-status';

export type RunStatus = 'uploaded' | 'queued' | 'processing' | 'ready' | 'failed' | 'cancelled';

/** One row of a study's runs table: entities, geometry, status, the latest decompose job, counts. */
export type RunListItem = {
  id: number;
  studyId: number;
  sub: string;
  ses: string | null;
  task: string | null;
  acq: string | null;
  runLabel: string | null;
  originalName: string;
  volumes: number | null;
  trSeconds: number | null;
  dims: number[] | null;
  status: RunStatus;
  statusMessage: string | null;
  hasMask: boolean;
  hasMotion: boolean;
  createdAt: Date;
  job: { id: number; status: JobStatus; stage: string | null; percent: number | null; message: string | null } | null;
  components: number | null;
  /** Warnings of the current decomposition (its summary): dimension at the bound, not converged. */
  decompositionWarnings: DecompositionWarning[];
  assigned: number;
  submitted: number;
  /** Agreement on the run (e.g. Fleiss κ); null until it has been computed. */
  agreement: number | null;
};

/** The columns of a run that the server needs for checks and actions (never sent as-is to a browser). */
export type RunRecord = {
  id: number;
  studyId: number;
  sub: string;
  ses: string | null;
  task: string | null;
  acq: string | null;
  runLabel: string | null;
  originalName: string;
  fileKey: string;
  maskKey: string | null;
  motionKey: string | null;
  sha256: string;
  volumes: number | null;
  status: RunStatus;
  createdBy: number;
};

const recordColumns = [
  'r.id',
  'r.study_id as studyId',
  'r.sub',
  'r.ses',
  'r.task',
  'r.acq',
  'r.run_label as runLabel',
  'r.original_name as originalName',
  'r.file_key as fileKey',
  'r.mask_key as maskKey',
  'r.motion_key as motionKey',
  'r.sha256',
  'r.volumes',
  'r.status',
  'r.created_by as createdBy',
] as const;

type Scoped = { user: Pick<UserRow, 'id' | 'role'> };

/** Limits a runs query (alias r) to what the user may see: admins all; study leads and observers their studies; raters their assigned runs. */
function scopeRuns(query: Knex.QueryBuilder, user: Scoped['user']): Knex.QueryBuilder {
  if (user.role === 'admin') return query;
  return query.where(function () {
    this.whereExists(
      db('study_members as m')
        .whereRaw('m.study_id = r.study_id')
        .andWhere('m.user_id', user.id)
        .whereIn('m.study_role', ['lead', 'observer'])
        .select(db.raw('1')),
    ).orWhereExists(db('assignments as a').whereRaw('a.run_id = r.id').andWhere('a.rater_id', user.id).select(db.raw('1')));
  });
}

/** Limits a runs query (alias r) to runs the user may change: admins, and users with the lead role who lead the run's study. */
function scopeManaged(query: Knex.QueryBuilder, user: Scoped['user']): Knex.QueryBuilder {
  if (user.role === 'admin') return query;
  if (user.role !== 'lead') return query.whereRaw('1 = 0');
  return query.whereExists(
    db('study_members as m')
      .whereRaw('m.study_id = r.study_id')
      .andWhere({ 'm.user_id': user.id, 'm.study_role': 'lead' })
      .select(db.raw('1')),
  );
}

/** A run the user may see, or null. */
export async function findRunForUser({ user, runId }: Scoped & { runId: number }): Promise<RunRecord | null> {
  return (await scopeRuns(db('runs as r').where('r.id', runId).first(recordColumns), user)) ?? null;
}

/** A run the user may change, or null. */
export async function findManagedRun(
  { user, runId }: Scoped & { runId: number },
  trx: Knex | Knex.Transaction = db,
): Promise<RunRecord | null> {
  const q = trx('runs as r').where('r.id', runId).first(recordColumns);
  return (await scopeManaged(q, user)) ?? null;
}

/** The run of a study that holds exactly this file (by sha256), if any. */
export async function findRunBySha({ studyId, sha256 }: { studyId: number; sha256: string }): Promise<RunRecord | null> {
  return (await db('runs as r').where({ 'r.study_id': studyId, 'r.sha256': sha256 }).first(recordColumns)) ?? null;
}

function latestJob(): Knex.Raw {
  return db.raw("(SELECT MAX(j2.id) FROM jobs j2 WHERE j2.run_id = r.id AND j2.kind = 'decompose')");
}

/**
 * The runs of a study the user may see (rows for the runs table), without agreement (null): the
 * use case lib/runs/list-study-runs.ts adds it for those who see every run.
 */
export async function listRunRows({ user, studyId, runId }: Scoped & { studyId: number; runId?: number }): Promise<RunListItem[]> {
  const query = db('runs as r')
    .leftJoin('jobs as j', 'j.id', latestJob())
    .leftJoin('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', db.raw('1'));
    })
    .where('r.study_id', studyId)
    .select(
      'r.id',
      'r.study_id as studyId',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'r.original_name as originalName',
      'r.volumes',
      'r.tr_seconds as trSeconds',
      'r.dims',
      'r.status',
      'r.status_message as statusMessage',
      'r.mask_key as maskKey',
      'r.motion_key as motionKey',
      'r.created_at as createdAt',
      'j.id as jobId',
      'j.status as jobStatus',
      'j.stage as jobStage',
      'j.percent as jobPercent',
      'j.message as jobMessage',
      'd.k as components',
      db.raw("JSON_EXTRACT(d.summary, '$.warnings') as decompositionWarnings"),
      db.raw('(SELECT COUNT(*) FROM assignments a WHERE a.run_id = r.id) as assigned'),
      db.raw('(SELECT COUNT(*) FROM assignments a WHERE a.run_id = r.id AND a.submitted_at IS NOT NULL) as submitted'),
    )
    .orderBy([{ column: 'r.sub' }, { column: 'r.ses' }, { column: 'r.task' }, { column: 'r.run_label' }, { column: 'r.id' }]);
  if (runId !== undefined) query.andWhere('r.id', runId);
  const rows = await scopeRuns(query, user);
  return rows.map((r: Record<string, unknown>): RunListItem => ({
    id: Number(r.id),
    studyId: Number(r.studyId),
    sub: r.sub as string,
    ses: (r.ses as string | null) ?? null,
    task: (r.task as string | null) ?? null,
    acq: (r.acq as string | null) ?? null,
    runLabel: (r.runLabel as string | null) ?? null,
    originalName: r.originalName as string,
    volumes: r.volumes == null ? null : Number(r.volumes),
    trSeconds: r.trSeconds == null ? null : Number(r.trSeconds),
    dims: parseJson<number[]>(r.dims, null),
    status: r.status as RunStatus,
    statusMessage: (r.statusMessage as string | null) ?? null,
    hasMask: r.maskKey != null,
    hasMotion: r.motionKey != null,
    createdAt: r.createdAt as Date,
    job:
      r.jobId == null
        ? null
        : {
            id: Number(r.jobId),
            status: r.jobStatus as JobStatus,
            stage: (r.jobStage as string | null) ?? null,
            percent: r.jobPercent == null ? null : Number(r.jobPercent),
            message: (r.jobMessage as string | null) ?? null,
          },
    components: r.components == null ? null : Number(r.components),
    decompositionWarnings: decompositionWarnings(r.decompositionWarnings),
    assigned: Number(r.assigned),
    submitted: Number(r.submitted),
    agreement: null,
  }));
}

/** Progress of a study at a glance. Vote-derived counts are left out (null) for users who see only their own runs. */
export type StudyProgress = {
  runsByStatus: Record<RunStatus, number>;
  runs: number;
  components: number;
  componentsRated: number | null;
  openDisagreements: number | null;
};

/**
 * Runs by status, components of current decompositions, components with a final (non-pending)
 * decision, and open disagreements (decisions still 'pending'), over the runs the user may see.
 */
export async function studyProgress({
  user,
  studyId,
  seesAllRuns,
}: Scoped & { studyId: number; seesAllRuns: boolean }): Promise<StudyProgress> {
  const visible = scopeRuns(db('runs as r').where('r.study_id', studyId).select('r.id'), user);
  const statusRows = await scopeRuns(
    db('runs as r').where('r.study_id', studyId).groupBy('r.status').select('r.status', db.raw('COUNT(*) as n')),
    user,
  );
  const runsByStatus: Record<RunStatus, number> = { uploaded: 0, queued: 0, processing: 0, ready: 0, failed: 0, cancelled: 0 };
  for (const s of statusRows) runsByStatus[s.status as RunStatus] = Number(s.n);
  const [comp] = await db('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .where('d.is_current', true)
    .whereIn('d.run_id', visible.clone())
    .count({ n: '*' });
  let componentsRated: number | null = null;
  let openDisagreements: number | null = null;
  if (seesAllRuns) {
    const decided = await db('decisions as x')
      .join('components as c', 'c.id', 'x.component_id')
      .join('decompositions as d', 'd.id', 'c.decomposition_id')
      .where('d.is_current', true)
      .whereIn('x.run_id', visible.clone())
      .groupByRaw("x.method = 'pending'")
      .select(db.raw("x.method = 'pending' as pending"), db.raw('COUNT(*) as n'));
    componentsRated = 0;
    openDisagreements = 0;
    for (const row of decided) {
      if (Number(row.pending) === 1) openDisagreements = Number(row.n);
      else componentsRated = Number(row.n);
    }
  }
  return {
    runsByStatus,
    runs: Object.values(runsByStatus).reduce((a, b) => a + b, 0),
    components: Number(comp?.n ?? 0),
    componentsRated,
    openDisagreements,
  };
}

/** Another run of the study with exactly these BIDS entities (null/empty alike), or null. */
export async function findRunWithEntities(
  {
    studyId,
    entities,
    exceptRunId,
  }: {
    studyId: number;
    entities: { sub: string; ses: string | null; task: string | null; acq: string | null; runLabel: string | null };
    exceptRunId?: number;
  },
  trx: Knex | Knex.Transaction = db,
): Promise<RunRecord | null> {
  const same = (q: Knex.QueryBuilder, column: string, value: string | null) =>
    value ? q.where(column, value) : q.where((w) => w.whereNull(column).orWhere(column, ''));
  let q = trx('runs as r').where({ 'r.study_id': studyId, 'r.sub': entities.sub });
  q = same(q, 'r.ses', entities.ses);
  q = same(q, 'r.task', entities.task);
  q = same(q, 'r.acq', entities.acq);
  q = same(q, 'r.run_label', entities.runLabel);
  if (exceptRunId) q = q.whereNot('r.id', exceptRunId);
  return (await q.orderBy('r.id').first(recordColumns)) ?? null;
}

type Entities = { sub: string; ses: string | null; task: string | null; acq: string | null; runLabel: string | null };

/** A run's BIDS entities, the row locked for the caller's transaction. */
export async function lockRunEntities(trx: Knex.Transaction, { runId }: { runId: number }): Promise<Entities> {
  const row = await trx('runs').where({ id: runId }).forUpdate().first('sub', 'ses', 'task', 'acq', 'run_label');
  return { sub: row.sub, ses: row.ses || null, task: row.task || null, acq: row.acq || null, runLabel: row.run_label || null };
}

/** Writes a run's BIDS entities. */
export async function writeRunEntities(trx: Knex.Transaction, { runId, entities }: { runId: number; entities: Entities }): Promise<void> {
  await trx('runs')
    .where({ id: runId })
    .update({ sub: entities.sub, ses: entities.ses, task: entities.task, acq: entities.acq, run_label: entities.runLabel });
}
