// What the denoise job (lib/worker/kinds/denoise.ts) reads: the run, the released or current
// decomposition, its noise decisions and its component time courses. No `server-only`: the worker reads it.
import type { Knex } from 'knex';
import { blobToFloat32, parseJson } from '@/lib/db/knex';

export type DenoiseRun = {
  id: number;
  study_id: number;
  sub: string;
  ses: string | null;
  task: string | null;
  acq: string | null;
  run_label: string | null;
  file_key: string;
  motion_key: string | null;
  motion_order: string | null;
  motion_rotation_units: 'radians' | 'degrees' | null;
};

export async function findRunForDenoise(db: Knex, { runId }: { runId: number }): Promise<DenoiseRun | undefined> {
  return db('runs')
    .where({ id: runId })
    .first('id', 'study_id', 'sub', 'ses', 'task', 'acq', 'run_label', 'file_key', 'motion_key', 'motion_order', 'motion_rotation_units');
}

/** The run's entry (decomposition and noise list) in a release of the study's manifest, or null. */
export async function releasedRunEntry(
  db: Knex,
  { releaseId, studyId, runId }: { releaseId: number; studyId: number; runId: number },
): Promise<{ runId: number; decompositionId: number; noise: number[] } | null> {
  const rel = await db('releases').where({ id: releaseId, study_id: studyId }).first('manifest');
  return (
    parseJson<{ runs: { runId: number; decompositionId: number; noise: number[] }[] }>(rel?.manifest, null)?.runs.find(
      (r) => r.runId === runId,
    ) ?? null
  );
}

export async function currentDecompositionId(db: Knex, { runId }: { runId: number }): Promise<number | null> {
  const d = await db('decompositions').where({ run_id: runId, is_current: true }).first('id');
  return d ? Number(d.id) : null;
}

/** The study's uncertain_in_export (undefined: no such study). */
export async function studyUncertainInExport(db: Knex, { studyId }: { studyId: number }): Promise<string | undefined> {
  const study = await db('studies').where({ id: studyId }).first('uncertain_in_export');
  return study?.uncertain_in_export;
}

/** Each component of the decomposition with its decision's label (null: none yet). */
export async function listComponentLabels(
  db: Knex,
  { decompositionId }: { decompositionId: number },
): Promise<Array<{ idx: number; label: string | null }>> {
  const decisions = await db('components as c')
    .leftJoin('decisions as x', 'x.component_id', 'c.id')
    .where('c.decomposition_id', decompositionId)
    .select('c.idx', 'x.label');
  return decisions.map((r: { idx: number; label: string | null }) => ({ idx: Number(r.idx), label: r.label }));
}

export async function findDecompositionSettings(
  db: Knex,
  { decompositionId }: { decompositionId: number },
): Promise<{ maskKey: string | null; summary: Record<string, unknown>; parameters: Record<string, unknown> } | null> {
  const dec = await db('decompositions').where({ id: decompositionId }).first('id', 'parameters', 'summary', 'mask_key', 'k');
  if (!dec) return null;
  return {
    maskKey: dec.mask_key,
    summary: parseJson<Record<string, unknown>>(dec.summary, {}) ?? {},
    parameters: parseJson<Record<string, unknown>>(dec.parameters, {}) ?? {},
  };
}

/** The components' time courses in idx order (null where none is stored). */
export async function listComponentTimecourses(
  db: Knex,
  { decompositionId }: { decompositionId: number },
): Promise<Array<Float32Array | null>> {
  const comps = await db('components').where({ decomposition_id: decompositionId }).orderBy('idx').select('idx', 'timecourse');
  return comps.map((c: { timecourse: Buffer | null }) => blobToFloat32(c.timecourse));
}
