// Writes to one run by its leads (lib/runs/actions.ts, lib/runs/upload.ts, lib/runs/import-run.ts):
// the row, its lock, its decompose jobs, what deleting it must know.
import 'server-only';
import type { Knex } from 'knex';
import { db, parseJson, toJson } from '@/lib/db/knex';
import { cancelJob } from './jobs';
import type { RunStatus } from './runs';

/** The run's status with its row locked FOR UPDATE (null: no such run). */
export async function lockRunStatus(trx: Knex.Transaction, { runId }: { runId: number }): Promise<RunStatus | null> {
  const row = await trx('runs').where({ id: runId }).forUpdate().first('status');
  return row ? (row.status as RunStatus) : null;
}

/** The study of a run, by id only (no access check; null: no such run). */
export async function findRunStudyId({ runId }: { runId: number }): Promise<number | null> {
  const row = await db('runs as r').where('r.id', runId).first('r.study_id as studyId');
  return row ? Number(row.studyId) : null;
}

/** The payload of the run's latest decompose job ({} when it has none). */
export async function lastDecomposePayload(trx: Knex.Transaction, { runId }: { runId: number }): Promise<Record<string, unknown>> {
  const last = await trx('jobs').where({ run_id: runId, kind: 'decompose' }).orderBy('id', 'desc').first('payload');
  return last ? (parseJson<Record<string, unknown>>(last.payload, {}) ?? {}) : {};
}

/** Cancels the run's queued and running decompose jobs (cancelJob, one by one); returns their ids. */
export async function cancelOpenDecomposeJobs({ runId, message }: { runId: number; message: string }): Promise<number[]> {
  const open = await db('jobs').where({ run_id: runId, kind: 'decompose' }).whereIn('status', ['queued', 'running']).select('id');
  for (const job of open) await cancelJob(db, Number(job.id), { message });
  return open.map((j) => Number(j.id));
}

/** A queued or processing run becomes cancelled with the message. */
export async function markRunCancelled({ runId, message }: { runId: number; message: string }): Promise<void> {
  await db('runs')
    .where({ id: runId })
    .whereIn('status', ['queued', 'processing'])
    .update({ status: 'cancelled', status_message: message });
}

/** How many released decisions name the run. */
export async function countReleasedDecisions(trx: Knex.Transaction, { runId }: { runId: number }): Promise<number> {
  const [released] = await trx('release_decisions').where({ run_id: runId }).count({ n: '*' });
  return Number(released.n);
}

/** The run's votes and the raters who cast them. */
export async function countRunVotes(trx: Knex.Transaction, { runId }: { runId: number }): Promise<{ votes: number; raters: number }> {
  const [votes] = await trx('votes').where({ run_id: runId }).select(db.raw('COUNT(*) as n'), db.raw('COUNT(DISTINCT rater_id) as raters'));
  return { votes: Number(votes.n), raters: Number(votes.raters) };
}

/** The storage keys of the run's decompositions (components, mean, mask). */
export async function listDecompositionKeys(
  trx: Knex.Transaction,
  { runId }: { runId: number },
): Promise<Array<{ componentsKey: string | null; meanKey: string | null; maskKey: string | null }>> {
  const decompositions = await trx('decompositions').where({ run_id: runId }).select('components_key', 'mean_key', 'mask_key');
  return decompositions.map((d) => ({ componentsKey: d.components_key, meanKey: d.mean_key, maskKey: d.mask_key }));
}

/** Deletes the run row (the schema's foreign keys take what hangs on it). */
export async function deleteRunRow(trx: Knex.Transaction, { runId }: { runId: number }): Promise<void> {
  await trx('runs').where({ id: runId }).delete();
}

/** The run's latest decompose job (null: none). */
export async function latestDecomposeJob({ runId }: { runId: number }) {
  const job = await db('jobs')
    .where({ run_id: runId, kind: 'decompose' })
    .orderBy('id', 'desc')
    .first('id', 'status', 'stage', 'percent', 'message', 'attempts', 'updated_at as updatedAt');
  return job ?? null;
}

/** Inserts an uploaded run (status uploaded); returns its id. */
export async function insertRun(
  trx: Knex.Transaction,
  r: {
    studyId: number;
    sub: string;
    ses: string | null;
    task: string | null;
    acq: string | null;
    runLabel: string | null;
    originalName: string;
    fileKey: string;
    sha256: string;
    sizeBytes: number;
    dims: number[];
    voxelSize: number[];
    trSeconds: number | null;
    volumes: number;
    datatype: string;
    createdBy: number;
  },
): Promise<number> {
  const [id] = await trx('runs').insert({
    study_id: r.studyId,
    sub: r.sub,
    ses: r.ses,
    task: r.task,
    acq: r.acq,
    run_label: r.runLabel,
    original_name: r.originalName,
    file_key: r.fileKey,
    sha256: r.sha256,
    size_bytes: r.sizeBytes,
    dims: toJson(r.dims),
    voxel_size: toJson(r.voxelSize),
    tr_seconds: r.trSeconds,
    volumes: r.volumes,
    datatype: r.datatype,
    status: 'uploaded',
    created_by: r.createdBy,
  });
  return Number(id);
}

export async function setRunMask(trx: Knex.Transaction, { runId, maskKey }: { runId: number; maskKey: string }): Promise<void> {
  await trx('runs').where({ id: runId }).update({ mask_key: maskKey });
}

export async function setRunMotion(
  trx: Knex.Transaction,
  { runId, motionKey, order, units }: { runId: number; motionKey: string; order: string; units: string },
): Promise<void> {
  await trx('runs').where({ id: runId }).update({ motion_key: motionKey, motion_order: order, motion_rotation_units: units });
}
