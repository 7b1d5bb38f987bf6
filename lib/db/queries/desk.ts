import 'server-only';
import type { Knex } from 'knex';
import { blobToFloat32, db, parseJson } from '@/lib/db/knex';
import type { DeskComponent } from '@/lib/desk/types';
import type { LowReproducibilityPolicy } from '@/lib/vocabulary/protocol';

type Caller = { id: number };

/**
 * The caller's assignment on a ready run with its study's protocol, or null (no such run, or not
 * theirs). Every desk use case starts here (lib/runs/assigned-run.ts turns null into the 404): the
 * rater reaches a run only through an assignment row with their id.
 */
export async function findAssignedRun(
  { user, runId, forUpdate = false }: { user: Caller; runId: number; forUpdate?: boolean },
  trx: Knex | Knex.Transaction = db,
) {
  const q = trx('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('studies as s', 's.id', 'r.study_id')
    .join('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', trx.raw('1'));
    })
    .where({ 'a.run_id': runId, 'a.rater_id': user.id, 'r.status': 'ready' })
    .first(
      'a.id as assignmentId',
      'a.submitted_at as submittedAt',
      'a.first_submitted_at as firstSubmittedAt',
      'a.reopen_count as reopenCount',
      'a.started_at as startedAt',
      'a.last_component_idx as lastComponentIdx',
      'r.id as runId',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'r.tr_seconds as trSeconds',
      'r.volumes',
      'r.motion_key as motionKey',
      'r.motion_order as motionOrder',
      'r.motion_rotation_units as motionRotationUnits',
      'r.structural_key as structuralKey',
      'r.structural_name as structuralName',
      's.id as studyId',
      's.name as studyName',
      's.label_set as labelSet',
      's.noise_kinds as noiseKinds',
      's.blinding',
      's.show_votes_after_submit as showVotesAfterSubmit',
      's.reproducibility_threshold as reproducibilityThreshold',
      's.low_reproducibility as lowReproducibility',
      'd.id as decompositionId',
      'd.k',
      'd.parameters',
      'd.summary',
      'd.components_key as componentsKey',
      'd.mean_key as meanKey',
      'd.mask_key as maskKey',
    );
  if (forUpdate) {
    // Lock this rater's assignment row alone (it serialises the rater's writes on the run), then read
    // the run, study and decomposition under shared locks: raters of one study vote side by side,
    // while a release (which locks the study row exclusively) waits for votes in flight and they for it.
    const own = await trx('assignments').where({ run_id: runId, rater_id: user.id }).forUpdate().first('id');
    if (!own) return null;
    q.forShare();
  }
  const row = await q;
  if (!row) return null;
  const dropped = droppedVolumesOf(row);
  return {
    ...row,
    blinding: Boolean(row.blinding),
    showVotesAfterSubmit: Boolean(row.showVotesAfterSubmit),
    reopenCount: Number(row.reopenCount ?? 0),
    labelSet: parseJson<string[]>(row.labelSet, []) ?? [],
    noiseKinds: parseJson<string[]>(row.noiseKinds, []) ?? [],
    droppedVolumes: dropped,
    k: Number(row.k),
    reproducibilityRule: {
      threshold: row.reproducibilityThreshold == null ? 0.8 : Number(row.reproducibilityThreshold),
      policy: (row.lowReproducibility ?? 'flag') as LowReproducibilityPolicy,
    },
  };
}

/** A rater's assignment on a ready run as findAssignedRun returns it. */
export type AssignedRun = NonNullable<Awaited<ReturnType<typeof findAssignedRun>>>;

/** True once a release (of the run, or of the study with this run in it) exists. */
export async function isRunReleased({ runId }: { runId: number }, trx: Knex | Knex.Transaction = db): Promise<boolean> {
  const hit = await trx('releases')
    .where('run_id', runId)
    .orWhereExists(
      trx('release_decisions').whereRaw('release_decisions.release_id = releases.id').andWhere('release_decisions.run_id', runId),
    )
    .first('id');
  return Boolean(hit);
}

const round = (v: number) => (Number.isFinite(v) ? Number(v.toPrecision(6)) : 0);
const toList = (blob: Buffer | null) => Array.from(blobToFloat32(blob) ?? [], round);

/** Initial volumes the decomposition dropped (its parameters, else its summary). */
export function droppedVolumesOf(d: { parameters: unknown; summary: unknown }): number {
  const parameters = parseJson<Record<string, unknown>>(d.parameters, {}) ?? {};
  const summary = parseJson<Record<string, unknown>>(d.summary, {}) ?? {};
  return Number(parameters.drop ?? summary.droppedVolumes ?? 0) || 0;
}

/** The components of one decomposition as the desk and Reconcile draw them (1..k). */
export async function componentsOfDecomposition({ decompositionId }: { decompositionId: number }): Promise<DeskComponent[]> {
  const rows = await db('components')
    .where({ decomposition_id: decompositionId })
    .orderBy('idx')
    .select('id', 'idx', 'variance_explained as varianceExplained', 'features', 'timecourse', 'spectrum', 'frequencies');
  return rows.map((r) => ({
    id: r.id,
    idx: r.idx,
    varianceExplained: Number(r.varianceExplained),
    features: parseJson<Record<string, number | null>>(r.features, {}) ?? {},
    timecourse: toList(r.timecourse),
    spectrum: toList(r.spectrum),
    frequencies: toList(r.frequencies),
  }));
}

/** Remembers where the rater is on the run (reopens there next time); the rater's first visit starts the clock. */
export async function updateDeskPosition({ assignmentId, componentIdx }: { assignmentId: number; componentIdx: number }): Promise<void> {
  await db('assignments')
    .where({ id: assignmentId })
    .update({ last_component_idx: componentIdx, started_at: db.raw('COALESCE(started_at, CURRENT_TIMESTAMP(3))') });
}

/** The components of a decomposition that the rater has not voted on, in order (id, index, features). */
export async function listUnvotedComponents(
  trx: Knex.Transaction,
  { decompositionId, raterId }: { decompositionId: number; raterId: number },
) {
  const rows = await trx('components as c')
    .leftJoin('votes as v', function () {
      this.on('v.component_id', 'c.id').andOn('v.rater_id', trx.raw('?', [raterId]));
    })
    .where('c.decomposition_id', decompositionId)
    .whereNull('v.id')
    .orderBy('c.idx')
    .select('c.id', 'c.idx', 'c.features');
  return rows.map((r) => ({
    id: Number(r.id),
    idx: Number(r.idx),
    features: parseJson<Record<string, number | null>>(r.features, {}) ?? {},
  }));
}

/**
 * Marks an assignment submitted at `at` and copies the rater's votes on the decomposition to
 * submitted_votes; votes already copied by an earlier submission (before a reopen) stay as they were.
 */
export async function markAssignmentSubmitted(
  trx: Knex.Transaction,
  {
    assignmentId,
    runId,
    raterId,
    decompositionId,
    at,
  }: { assignmentId: number; runId: number; raterId: number; decompositionId: number; at: Date },
): Promise<void> {
  await trx('assignments')
    .where({ id: assignmentId })
    .update({ submitted_at: at, first_submitted_at: trx.raw('COALESCE(first_submitted_at, ?)', [at]) });
  await trx.raw(
    `INSERT INTO submitted_votes (component_id, run_id, rater_id, label, noise_kind, confidence, note, submitted_at)
     SELECT v.component_id, v.run_id, v.rater_id, v.label, v.noise_kind, v.confidence, v.note, ?
     FROM votes v JOIN components c ON c.id = v.component_id
     WHERE v.run_id = ? AND v.rater_id = ? AND c.decomposition_id = ?
     ON DUPLICATE KEY UPDATE submitted_votes.id = submitted_votes.id`,
    [at, runId, raterId, decompositionId],
  );
}
