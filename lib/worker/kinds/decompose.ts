/**
 * Job kind `decompose` (payload { runId, decompositionOptions? }): reads the run's NIfTI (and its
 * mask and motion table) from storage, decomposes it under the study's protocol, writes the
 * outputs to a fresh storage directory and — in one transaction that also completes the job —
 * replaces the run's current decomposition, inserts its components, sets the run ready and
 * assigns raters. A retried or duplicated attempt therefore never leaves two sets of components.
 * Progress stages: reading, masking, pca, ica, features, writing.
 */
import { readFile, stat } from 'node:fs/promises';
import { dropInitialVolumes, parseMotionFile, type MotionOrder, type MotionParams } from '@/lib/decomposition/motion';
import { decomposeRun, type DecomposeOptions } from '@/lib/decomposition/pipeline';
import { DEFAULT_DIM_METHOD } from '@/lib/decomposition/dimensionality';
import { readNiftiFile, type NiftiImage } from '@/lib/nifti';
import { assignRaters, type AssignRatersResult } from '@/lib/runs/assign-raters';
import { afterAssignmentsCreated } from '@/lib/jobs/queue-notifications';
import { componentRows, decompositionSummary, storeDecomposition, writeDecompositionFiles } from '@/lib/runs/ingest-decomposition';
import {
  findDecompositionProtocol,
  findRunToDecompose,
  markRunProcessingWhileOwned,
  type ProtocolRow,
} from '@/lib/db/queries/decompose-run';
import { recordStorageFault } from '@/lib/db/queries/storage-faults';
import { pathFor, removeKey } from '@/lib/storage';
import { storageFaultKind } from '@/lib/storage/faults';
import { JobError, PermanentJobError } from '@/lib/jobs/errors';
import { decomposePayloadSchema, type DecomposePayload } from '@/lib/jobs/payloads';
import { defineJobKind } from '../types';
import { decomposeOnSlurm } from '../executors/decompose-on-slurm';
import { executorName, slurmSettings } from '../executors/settings';
import { queueScoringOfNewRun } from './score-suggestions';

/** Which of our stages an engine stage (reported when it has finished) leads into. */
const NEXT_STAGE: Record<string, string> = {
  mean: 'masking',
  mask: 'pca',
  matrix: 'pca',
  smoothness: 'pca',
  covariance: 'pca',
  pca: 'pca',
  dimensionality: 'pca',
  whitening: 'ica',
  ica: 'ica',
  orient: 'features',
};

/** The engine's options from the study protocol with the payload's overrides on top. */
export function decomposeOptionsFor(protocol: ProtocolRow, o: DecomposePayload['decompositionOptions'] = {}): DecomposeOptions {
  const opts: DecomposeOptions = {
    drop: o.drop ?? Number(protocol.drop_volumes ?? 0),
    detrend: o.detrend ?? Boolean(protocol.detrend),
    varianceNorm: o.varianceNorm ?? Boolean(protocol.variance_norm),
    seed: o.seed ?? 1,
    contrast: o.contrast ?? 'logcosh',
    tol: o.tol ?? 1e-4,
    maxIter: o.maxIter ?? 200,
    ...(o.restarts !== undefined ? { restarts: o.restarts } : {}),
  };
  if (o.components !== undefined || o.dimMethod !== undefined || o.varianceFraction !== undefined) {
    opts.components = o.components ?? 'auto';
    opts.dimMethod = o.varianceFraction !== undefined ? { variance: o.varianceFraction } : (o.dimMethod ?? DEFAULT_DIM_METHOD);
  } else if (protocol.dim_method === 'fixed') {
    if (!protocol.fixed_components)
      throw new PermanentJobError('The study protocol asks for a fixed number of components but gives none; set it in the protocol.');
    opts.components = Number(protocol.fixed_components);
    opts.dimMethod = DEFAULT_DIM_METHOD;
  } else if (protocol.dim_method === 'variance') {
    const f = Number(protocol.variance_fraction);
    if (!(f > 0 && f < 1))
      throw new PermanentJobError(
        'The study protocol asks for a variance fraction but gives none between 0 and 1; set it in the protocol.',
      );
    opts.components = 'auto';
    opts.dimMethod = { variance: f };
  } else {
    opts.components = 'auto';
    opts.dimMethod = protocol.dim_method;
  }
  const threads = Number(process.env.QUORUM_DECOMPOSE_THREADS);
  if (Number.isInteger(threads) && threads > 0) opts.threads = threads;
  return opts;
}

/** runs.motion_order ("rot-first", "trans-first" or a column list such as "rx,ry,rz,tx,ty,tz"). */
export function motionOrderOf(value: string | null): MotionOrder {
  const v = (value ?? 'rot-first').trim().toLowerCase();
  if (v === 'rot-first' || v === 'trans-first') return v;
  if (/^r/.test(v)) return 'rot-first';
  if (/^t/.test(v)) return 'trans-first';
  throw new PermanentJobError(`The run's motion column order "${value}" is not understood; use rx,ry,rz,tx,ty,tz or tx,ty,tz,rx,ry,rz.`);
}

/**
 * A failure that the same input will always produce (no positive voxels, no finite data, a bad
 * option, too few volumes, a run too large for memory) as a PermanentJobError, so the job fails at
 * once instead of being retried; null for anything a retry might fix (a crashed worker thread).
 */
export function deterministic(err: unknown): PermanentJobError | null {
  if (!(err instanceof Error)) return null;
  if ((err.name === 'DecompositionError' && (err as { code?: string }).code !== 'worker_failed') || err.name === 'BrainMaskError') {
    return new PermanentJobError(err.message, { cause: err });
  }
  if (err instanceof RangeError && /allocation failed|invalid (typed )?array length/i.test(err.message)) {
    return new PermanentJobError(
      'The run is too large to decompose on this server (not enough memory); crop it or use fewer volumes, or ask the facility admin.',
      { cause: err },
    );
  }
  return null;
}

async function readStored<T>(what: string, key: string, read: (path: string) => Promise<T>): Promise<T> {
  let path: string;
  try {
    path = pathFor(key);
  } catch (err) {
    throw new PermanentJobError(`The ${what} has an invalid storage key; upload it again.`, { cause: err });
  }
  try {
    return await read(path);
  } catch (err) {
    const code = (err as { code?: string }).code;
    if (code === 'ENOENT') throw new JobError(`The ${what} is missing from storage; upload it again.`, { cause: err });
    if (code === 'EACCES' || code === 'EPERM')
      throw new JobError(`The ${what} cannot be read (permission denied on the storage).`, { cause: err });
    if (err instanceof Error && err.name === 'NiftiError') throw new JobError(`The ${what} cannot be read: ${err.message}`, { cause: err });
    throw err;
  }
}

export const decomposeKind = defineJobKind({
  kind: 'decompose',
  payloadSchema: decomposePayloadSchema,
  async run(ctx) {
    const { db, payload } = ctx;
    const runId = payload.runId;
    const run = await findRunToDecompose(db, { runId });
    if (!run) throw new PermanentJobError(`Run ${runId} no longer exists.`);
    const protocol = await findDecompositionProtocol(db, { studyId: run.study_id });
    if (!protocol) throw new PermanentJobError(`The study of run ${runId} no longer exists.`);
    const options = decomposeOptionsFor(protocol, payload.decompositionOptions);

    await ctx.progress('reading', 1);
    // only while this worker still holds the job: a worker that is stopping may have released it
    await markRunProcessingWhileOwned(db, { runId, jobId: ctx.job.id, workerId: ctx.workerId });
    if (executorName() === 'slurm') {
      // the cluster reads the run from shared storage: the worker only submits, waits and imports
      let settings;
      try {
        settings = slurmSettings();
      } catch (err) {
        throw new JobError(`The cluster executor is not configured correctly: ${(err as Error).message}`, { cause: err });
      }
      await readStored("run's file", run.file_key, (p) => stat(p));
      const stored = await decomposeOnSlurm(
        ctx,
        settings,
        {
          id: runId,
          studyId: Number(run.study_id),
          fileKey: run.file_key,
          maskKey: run.mask_key ?? null,
          motionKey: run.motion_key ?? null,
          motionOrder: motionOrderOf(run.motion_order),
          motionUnits: run.motion_rotation_units ?? 'radians',
        },
        options,
        { stageOf: (s) => NEXT_STAGE[s] ?? s, percentOf: (p) => 5 + p * 0.75, overrides: payload.decompositionOptions },
      );
      ctx.logger.info(
        `run ${runId}: ${stored.k} components from the cluster (decomposition ${stored.decompositionId}, ${stored.assignment.outcome})`,
      );
      return stored;
    }
    const image: NiftiImage = await readStored("run's file", run.file_key, (p) => readNiftiFile(p));
    ctx.throwIfStopped();
    let mask: Uint8Array | undefined;
    if (run.mask_key) {
      const m = await readStored("run's mask", run.mask_key, (p) => readNiftiFile(p));
      if (m.voxelsPerVolume !== image.voxelsPerVolume) {
        throw new PermanentJobError(
          `The mask has ${m.nx} × ${m.ny} × ${m.nz} voxels but the run has ${image.nx} × ${image.ny} × ${image.nz}; upload a mask on the run's grid.`,
        );
      }
      const vol = m.readVolume(0);
      mask = new Uint8Array(vol.length);
      for (let i = 0; i < vol.length; i++) mask[i] = vol[i] !== 0 && Number.isFinite(vol[i]) ? 1 : 0;
    }
    let motion: MotionParams | undefined;
    if (run.motion_key) {
      const text = await readStored("run's motion table", run.motion_key, (p) => readFile(p, 'utf8'));
      try {
        const full = parseMotionFile(text, {
          order: motionOrderOf(run.motion_order),
          rotationUnits: run.motion_rotation_units ?? 'radians',
          expectedRows: image.nt,
        });
        motion = dropInitialVolumes(full, options.drop ?? 0);
      } catch (err) {
        if (err instanceof Error && err.name === 'MotionFileError') throw new PermanentJobError(err.message, { cause: err });
        throw err;
      }
    }
    await ctx.progress('masking', 5);

    const started = Date.now();
    // ICA reports every iteration: pass on a change of stage, or of a whole percent, not each one
    let last = '';
    const result = await decomposeRun({ image, mask, motion }, options, (stage, pct, detail) => {
      const ours = NEXT_STAGE[stage] ?? stage;
      const percent = 5 + pct * 0.75;
      const key = `${ours} ${Math.floor(percent)}`;
      if (key === last) return;
      last = key;
      ctx.progressSync(ours, percent, detail ?? null);
    }).catch((err: unknown) => {
      throw deterministic(err) ?? err;
    });
    ctx.throwIfStopped();
    for (const w of result.warnings) ctx.logger.warn(`run ${runId}: ${w.code}: ${w.message}`);
    await ctx.progress('features', 82);
    const components = componentRows(result, motion);
    await ctx.progress('writing', 90);
    const files = await writeDecompositionFiles(result, image.header).catch(async (err: unknown) => {
      // any file-system error while writing results is the storage's fault (a read-only mount
      // answers mkdir -p with ENOENT on some kernels), never text for people
      const fault = storageFaultKind(err) ?? ((err as { syscall?: string }).syscall ? 'denied' : null);
      if (!fault) throw err;
      ctx.logger.error(`run ${runId}: storage fault while writing the results: ${(err as Error).message}`);
      // the admin's alert on the Facility page (same row as lib/errors.ts writes; the worker has no server-only imports)
      await recordStorageFault(db, {
        kind: fault,
        code: (err as { code?: string }).code,
        where: `decompose job ${ctx.job.id}`,
      }).catch(() => undefined);
      // people read this on the run: no file-system text (it names paths); retried, the admin is alerted
      throw new JobError(
        fault === 'full'
          ? "The results could not be written: the facility's storage is full. The facility admin has been alerted."
          : "The results could not be written: the facility's storage refused the write (read-only or permission denied). The facility admin has been alerted.",
        { cause: err },
      );
    });
    const parameters = {
      engine: 'quorum-decomposition',
      mask: mask ? 'uploaded' : 'automatic',
      dropVolumes: result.droppedVolumes,
      detrend: result.detrended,
      varianceNorm: result.varianceNormalised,
      components: options.components,
      dimMethod: options.dimMethod,
      dimMethodUsed: result.dimMethod,
      seed: result.requestedSeed,
      seedUsed: result.seed,
      contrast: result.contrast,
      tol: result.tol,
      maxIter: result.maxIter,
      restarts: result.restarts?.runs ?? 1,
      threads: result.threads,
      trSeconds: result.trSeconds,
      motion: motion ? { order: motionOrderOf(run.motion_order), rotationUnits: run.motion_rotation_units ?? 'radians' } : null,
      overrides: payload.decompositionOptions ?? null,
      jobId: ctx.job.id,
      attempt: ctx.job.attempts,
    };
    try {
      const stored = await ctx.commit(
        async (trx) => {
          const decompositionId = await storeDecomposition(trx, {
            runId,
            parameters,
            summary: decompositionSummary(result),
            files,
            components,
          });
          const assignment: AssignRatersResult = await assignRaters(trx, { runId });
          if (assignment.raterIds.length) await afterAssignmentsCreated(trx, { studyId: Number(run.study_id) });
          await queueScoringOfNewRun(trx, { studyId: Number(run.study_id), runId });
          return { decompositionId, assignment };
        },
        (v) => ({ decompositionId: v.decompositionId, k: result.k, raters: v.assignment.raterIds, assignment: v.assignment.outcome }),
      );
      ctx.logger.info(
        `run ${runId}: ${result.k} components in ${((Date.now() - started) / 1000).toFixed(1)} s (decomposition ${stored.decompositionId}, ${stored.assignment.outcome})`,
      );
      return stored;
    } catch (err) {
      await removeKey(files.dirKey).catch(() => undefined);
      throw err;
    }
  },
});
