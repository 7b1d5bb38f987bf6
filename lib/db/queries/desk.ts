import 'server-only';
import { decompositionWarnings } from '@/lib/decomposition/warnings';
import type { Knex } from 'knex';
import { readFile } from 'node:fs/promises';
import { blobToFloat32, db, parseJson } from '@/lib/db/knex';
import { AppError } from '@/lib/errors';
import { bidsName } from '@/lib/bids';
import { pathFor } from '@/lib/storage';
import { dropInitialVolumes, framewiseDisplacement, parseMotionFile } from '@/lib/decomposition/motion';
import { structuralOf, type ComponentsPayload, type DeskComponent, type DeskRun } from '@/lib/desk/types';
import { arrangeForDesk, type ReproducibilityRule } from '@/lib/desk/reproducibility';
import type { LowReproducibilityPolicy } from '@/lib/studies/labels';

type Caller = { id: number };

/** The same refusal for "no such run" and "not yours", so a rater cannot probe other runs. */
export const notAssigned = (runId: number) =>
  new AppError('not_found', `Run ${runId} is not among the runs assigned to you. Open it from your queue on the home page.`);

/**
 * The caller's assignment on a ready run with its study's protocol, or a 404. Every desk query
 * starts here: the rater reaches a run only through an assignment row with their id.
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
    if (!own) throw notAssigned(runId);
    q.forShare();
  }
  const row = await q;
  if (!row) throw notAssigned(runId);
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
    } satisfies ReproducibilityRule,
  };
}

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

type MotionSource = {
  runId: number;
  motionKey: string | null;
  motionOrder: string | null;
  motionRotationUnits: string | null;
  droppedVolumes: number;
};

/**
 * The run's motion parameters over the kept volumes: framewise displacement (mm), the three
 * translations (mm) and the three rotations (degrees, for reading), or nulls without a motion file.
 */
export async function readRunMotion(run: MotionSource): Promise<{ fd: number[] | null; motion: DeskRun['motion'] }> {
  if (!run.motionKey) return { fd: null, motion: null };
  try {
    const text = await readFile(pathFor(run.motionKey), 'utf8');
    const order = String(run.motionOrder ?? '')
      .trim()
      .toLowerCase()
      .startsWith('r')
      ? 'rot-first'
      : 'trans-first';
    const motion = parseMotionFile(text, { order, rotationUnits: run.motionRotationUnits === 'degrees' ? 'degrees' : 'radians' });
    const kept = run.droppedVolumes > 0 ? dropInitialVolumes(motion, run.droppedVolumes) : motion;
    const deg = 180 / Math.PI;
    return {
      fd: Array.from(framewiseDisplacement(kept), round),
      motion: {
        translations: kept.translations.map((c) => Array.from(c, round)),
        rotationsDeg: kept.rotations.map((c) => Array.from(c, (v) => round(v * deg))),
      },
    };
  } catch (err) {
    console.error(`[desk] motion parameters of run ${run.runId} unreadable:`, (err as Error).message);
    return { fd: null, motion: null };
  }
}

/**
 * GET /api/runs/:id/components — the run and its current decomposition's components, for the
 * assigned rater. Carries no votes, tallies or decisions of anyone.
 */
export async function loadDeskComponents({ user, runId }: { user: Caller; runId: number }): Promise<ComponentsPayload> {
  const run = await findAssignedRun({ user, runId });
  const all = await componentsOfDecomposition({ decompositionId: run.decompositionId });
  // the study's rule for low reproducibility: flag (as they are), last, or hidden from raters
  const { components, hidden } = arrangeForDesk(all, run.reproducibilityRule);
  return {
    run: {
      runId: run.runId,
      decompositionId: run.decompositionId,
      name: bidsName(run),
      studyId: run.studyId,
      studyName: run.studyName,
      trSeconds: Number(run.trSeconds),
      droppedVolumes: run.droppedVolumes,
      k: all.length,
      warnings: decompositionWarnings(run.summary),
      labelSet: run.labelSet,
      noiseKinds: run.noiseKinds,
      ...(await readRunMotion(run).then((m) => ({ framewiseDisplacement: m.fd, motion: m.motion }))),
      structural: structuralOf(run.structuralKey, run.structuralName),
      lastComponentIdx: run.lastComponentIdx == null ? null : Number(run.lastComponentIdx),
      reproducibility: { ...run.reproducibilityRule, hidden },
    },
    components,
  };
}

/** The storage key of one of the run's decomposition files, for the assigned rater. */
export async function findRunFileKey({
  user,
  runId,
  file,
}: {
  user: Caller;
  runId: number;
  file: 'components.nii.gz' | 'mean.nii.gz' | 'mask.nii.gz' | 'structural.nii.gz';
}) {
  const run = await findAssignedRun({ user, runId });
  const key =
    file === 'components.nii.gz'
      ? run.componentsKey
      : file === 'mean.nii.gz'
        ? run.meanKey
        : file === 'mask.nii.gz'
          ? run.maskKey
          : run.structuralKey;
  if (!key)
    throw new AppError(
      'not_found',
      file === 'structural.nii.gz'
        ? `Run ${runId} has no structural image; a study lead can attach one.`
        : `Run ${runId} has no ${file} yet; its decomposition did not write it.`,
    );
  return { key: key as string, decompositionId: run.decompositionId as number };
}

/** PUT /api/runs/:id/desk — remembers where the rater is (reopens there next time). */
export async function saveDeskPosition({ user, runId, componentIdx }: { user: Caller; runId: number; componentIdx: number }) {
  const run = await findAssignedRun({ user, runId });
  if (componentIdx > run.k) {
    throw new AppError('validation', `Run ${runId} has ${run.k} components; component ${componentIdx} does not exist.`, {
      componentIdx: [`must be between 1 and ${run.k}`],
    });
  }
  await db('assignments')
    .where({ id: run.assignmentId })
    .update({ last_component_idx: componentIdx, started_at: db.raw('COALESCE(started_at, CURRENT_TIMESTAMP(3))') });
  return { componentIdx };
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
