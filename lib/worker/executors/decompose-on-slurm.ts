/**
 * The decompose job on Slurm: `quorum decompose` on the run's file in shared storage, on a node,
 * into the job's cluster folder; then the folder goes through the same checks as `quorum import`
 * (readDecompositionDir against the run's header, copyDecompositionFiles) and is stored in the
 * one transaction that completes the job — so a re-attached or repeated attempt still leaves
 * exactly one current set of components.
 */
import path from 'node:path';
import type { DecomposeOptions } from '@/lib/decomposition/pipeline';
import { readNiftiHeaderFile } from '@/lib/nifti';
import { assignRaters } from '@/lib/runs/assign-raters';
import { copyDecompositionFiles, ImportError, readDecompositionDir } from '@/lib/runs/import-decomposition';
import { storeDecomposition } from '@/lib/runs/ingest-decomposition';
import { queueScoringOfNewRun } from '../kinds/score-suggestions';
import { afterAssignmentsCreated } from '@/lib/jobs/queue-notifications';
import { pathFor, removeKey } from '@/lib/storage';
import { PermanentJobError } from '@/lib/jobs/errors';
import type { JobContext } from '../types';
import { clusterPathFor, runOnSlurm } from './run-on-slurm';
import type { SlurmSettings } from './settings';

/** `quorum decompose` flags for the engine options the worker would have used. */
export function decomposeFlags(o: DecomposeOptions): string[] {
  const f: string[] = [];
  if (o.components !== undefined) f.push('--components', String(o.components));
  if (o.dimMethod !== undefined) f.push('--dim-method', typeof o.dimMethod === 'string' ? o.dimMethod : `variance:${o.dimMethod.variance}`);
  if (o.seed !== undefined) f.push('--seed', String(o.seed));
  if (o.restarts !== undefined) f.push('--restarts', String(o.restarts));
  if (o.drop !== undefined) f.push('--drop', String(o.drop));
  if (o.varianceNorm === false) f.push('--no-variance-norm');
  if (o.detrend) f.push('--detrend');
  if (o.contrast !== undefined) f.push('--contrast', o.contrast);
  if (o.tol !== undefined) f.push('--tol', String(o.tol));
  if (o.maxIter !== undefined) f.push('--max-iter', String(o.maxIter));
  return f;
}

export interface RunForCluster {
  id: number;
  studyId: number;
  fileKey: string;
  maskKey: string | null;
  motionKey: string | null;
  motionOrder: 'rot-first' | 'trans-first';
  motionUnits: 'radians' | 'degrees';
}

export async function decomposeOnSlurm(
  ctx: JobContext<unknown>,
  settings: SlurmSettings,
  run: RunForCluster,
  options: DecomposeOptions,
  map: { stageOf: (s: string) => string; percentOf: (p: number) => number; overrides: unknown },
) {
  const { folders, clusterJobId } = await runOnSlurm(ctx, settings, {
    args: (f) => [
      'decompose',
      clusterPathFor(run.fileKey, settings),
      '--out',
      path.posix.join(f.cluster, 'out'),
      '--progress',
      path.posix.join(f.cluster, 'progress.json'),
      '--threads',
      String(settings.cpus),
      ...decomposeFlags({ ...options, threads: undefined }),
      ...(run.maskKey ? ['--mask', clusterPathFor(run.maskKey, settings)] : []),
      ...(run.motionKey
        ? ['--motion', clusterPathFor(run.motionKey, settings), '--motion-order', run.motionOrder, '--motion-units', run.motionUnits]
        : []),
    ],
    stageOf: map.stageOf,
    percentOf: map.percentOf,
  });

  await ctx.progress('importing', 85, `Cluster job ${clusterJobId} finished; checking and storing its results.`);
  const out = path.join(folders.local, 'out');
  let imported;
  try {
    imported = await readDecompositionDir(out, await readNiftiHeaderFile(pathFor(run.fileKey)));
  } catch (err) {
    if (err instanceof ImportError)
      throw new PermanentJobError(`The results of cluster job ${clusterJobId} cannot be imported: ${err.message}`, { cause: err });
    throw err;
  }
  const files = await copyDecompositionFiles(out);
  const parameters = {
    ...imported.parameters,
    source: 'decomposed on the cluster',
    executor: 'slurm',
    clusterJobId,
    mask: run.maskKey ? 'uploaded' : 'automatic',
    components: options.components,
    dimMethod: options.dimMethod,
    seed: options.seed,
    restarts: options.restarts ?? null,
    threads: settings.cpus,
    overrides: map.overrides ?? null,
    jobId: ctx.job.id,
    attempt: ctx.job.attempts,
  };
  try {
    return await ctx.commit(
      async (trx) => {
        const decompositionId = await storeDecomposition(trx, {
          runId: run.id,
          parameters,
          summary: imported.summary,
          files,
          components: imported.components,
        });
        const assignment = await assignRaters(trx, { runId: run.id });
        if (assignment.raterIds.length) await afterAssignmentsCreated(trx, { studyId: run.studyId });
        await queueScoringOfNewRun(trx, { studyId: run.studyId, runId: run.id });
        return { decompositionId, assignment, k: imported.components.length };
      },
      (v) => ({
        decompositionId: v.decompositionId,
        k: v.k,
        raters: v.assignment.raterIds,
        assignment: v.assignment.outcome,
        clusterJobId,
      }),
    );
  } catch (err) {
    await removeKey(files.dirKey).catch(() => undefined);
    throw err;
  }
}
