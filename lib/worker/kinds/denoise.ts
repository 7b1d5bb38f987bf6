/**
 * Job kind `denoise` (payload { runId, releaseId?, mode, includeMotion }): reads the run's NIfTI,
 * the component time courses of the released (or current) decomposition and the noise list of the
 * release (or of the current decisions under the study's uncertain_in_export), regresses the noise
 * components out volume by volume (lib/denoise) and writes a float32 .nii.gz under denoised/.
 * The file is written first, then the job completes with its key and checksum in one commit; a
 * lost lease removes the file again. Progress stages: reading, fitting, writing. With
 * QUORUM_EXECUTOR=slurm the fitting runs as a cluster job (executors/denoise-on-slurm.ts) and the
 * worker stores its output the same way.
 */
import { readFile } from 'node:fs/promises';
import { bidsName } from '@/lib/bids';
import {
  currentDecompositionId,
  findDecompositionSettings,
  findRunForDenoise,
  listComponentLabels,
  listComponentTimecourses,
  releasedRunEntry,
  studyUncertainInExport,
} from '@/lib/db/queries/denoise';
import { dropInitialVolumes, parseMotionFile } from '@/lib/decomposition/motion';
import { denoiseImage } from '@/lib/denoise/denoise-image';
import { denoisePayloadSchema, type DenoiseResult } from '@/lib/denoise/schema';
import { noiseList, type UncertainPolicy } from '@/lib/exports/noise-list';
import { readNiftiFile } from '@/lib/nifti';
import { ensureDirFor, newKey, pathFor, removeKey } from '@/lib/storage';
import { JobError, PermanentJobError } from '@/lib/jobs/errors';
import { denoiseOnSlurm } from '../executors/denoise-on-slurm';
import { executorName, slurmSettings } from '../executors/settings';
import { defineJobKind } from '../types';
import { motionOrderOf } from './decompose';

const NO_MOTION = 'The run has no motion parameters; request denoising without motion regressors or upload them.';

export const denoiseKind = defineJobKind({
  kind: 'denoise',
  payloadSchema: denoisePayloadSchema,
  async run(ctx) {
    const { db, payload } = ctx;
    const run = await findRunForDenoise(db, { runId: payload.runId });
    if (!run) throw new PermanentJobError(`Run ${payload.runId} no longer exists.`);
    let decompositionId: number;
    let noise: number[];
    if (payload.releaseId) {
      const entry = await releasedRunEntry(db, { releaseId: payload.releaseId, studyId: run.study_id, runId: run.id });
      if (!entry) throw new PermanentJobError(`Release ${payload.releaseId} does not contain run ${run.id}.`);
      decompositionId = entry.decompositionId;
      noise = entry.noise;
    } else {
      const current = await currentDecompositionId(db, { runId: run.id });
      if (current === null) throw new PermanentJobError(`Run ${run.id} has no decomposition to denoise with.`);
      decompositionId = current;
      const uncertain = await studyUncertainInExport(db, { studyId: run.study_id });
      noise = noiseList(await listComponentLabels(db, { decompositionId }), (uncertain ?? 'keep') as UncertainPolicy);
    }
    const dec = await findDecompositionSettings(db, { decompositionId });
    if (!dec) throw new PermanentJobError(`Decomposition ${decompositionId} no longer exists.`);
    const { summary, parameters } = dec;
    const drop = Number(summary.droppedVolumes ?? parameters.dropVolumes ?? parameters.drop ?? 0);
    const courses = await listComponentTimecourses(db, { decompositionId });
    const k = courses.length;
    if (courses.some((c) => !c)) throw new PermanentJobError('A component has no stored time course; decompose the run again.');
    const T = courses[0]!.length;
    const tcs = new Float32Array(T * k);
    for (let c = 0; c < k; c++) for (let t = 0; t < T; t++) tcs[t * k + c] = courses[c]![t]!;

    const stem = bidsName({ sub: run.sub, ses: run.ses, task: run.task, acq: run.acq, runLabel: run.run_label });
    // with motion regressors the name says so, so the two files of one release never share a name
    const name = `${stem}_desc-denoised${payload.mode}${payload.includeMotion ? 'motion' : ''}_bold.nii.gz`;
    if (payload.includeMotion && !run.motion_key) throw new PermanentJobError(NO_MOTION);

    if (executorName() === 'slurm') {
      let settings;
      try {
        settings = slurmSettings();
      } catch (err) {
        throw new JobError(`The cluster executor is not configured correctly: ${(err as Error).message}`, { cause: err });
      }
      const motion = payload.includeMotion
        ? { key: run.motion_key as string, order: motionOrderOf(run.motion_order), units: run.motion_rotation_units ?? 'radians' }
        : null;
      const out = await denoiseOnSlurm(ctx, settings, {
        fileKey: run.file_key,
        maskKey: dec.maskKey ?? null,
        motion,
        timecourses: tcs,
        k,
        noise,
        drop,
        mode: payload.mode,
      });
      try {
        const result: DenoiseResult = {
          key: out.key,
          name,
          sha256: out.sha256,
          bytes: out.bytes,
          mode: payload.mode,
          includeMotion: payload.includeMotion,
          noise,
          releaseId: payload.releaseId ?? null,
          volumes: T,
        };
        await ctx.commit(
          async () => result,
          (v) => ({ ...v, clusterJobId: out.clusterJobId }),
        );
        ctx.logger.info(
          `run ${run.id}: denoised on the cluster (job ${out.clusterJobId}, ${payload.mode}, ${noise.length} of ${k} components) → ${out.key}`,
        );
        return result;
      } catch (err) {
        await removeKey(out.key).catch(() => undefined);
        throw err;
      }
    }

    await ctx.progress('reading', 2);
    const image = await readNiftiFile(pathFor(run.file_key));
    let mask: Uint8Array | undefined;
    if (dec.maskKey) {
      const m = (await readNiftiFile(pathFor(dec.maskKey))).readVolume(0);
      mask = new Uint8Array(m.length);
      for (let i = 0; i < m.length; i++) mask[i] = m[i]! > 0 ? 1 : 0;
    }
    let motion;
    if (payload.includeMotion) {
      const full = parseMotionFile(await readFile(pathFor(run.motion_key as string), 'utf8'), {
        order: motionOrderOf(run.motion_order),
        rotationUnits: run.motion_rotation_units ?? 'radians',
        expectedRows: image.nt,
      });
      motion = dropInitialVolumes(full, drop);
    }
    ctx.throwIfStopped();
    const key = newKey('denoised', '.nii.gz');
    try {
      const out = await denoiseImage({
        image,
        drop,
        timecourses: tcs,
        k,
        noise,
        mode: payload.mode,
        motion,
        mask,
        outPath: await ensureDirFor(key),
        onProgress: (pct) => ctx.progressSync(pct < 50 ? 'fitting' : 'writing', 5 + pct * 0.9),
      });
      const result: DenoiseResult = {
        key,
        name,
        sha256: out.sha256,
        bytes: out.bytes,
        mode: payload.mode,
        includeMotion: payload.includeMotion,
        noise,
        releaseId: payload.releaseId ?? null,
        volumes: out.volumes,
      };
      await ctx.commit(
        async () => result,
        (v) => v,
      );
      ctx.logger.info(`run ${run.id}: denoised (${payload.mode}, ${noise.length} of ${k} components${motion ? ' + motion' : ''}) → ${key}`);
      return result;
    } catch (err) {
      await removeKey(key).catch(() => undefined);
      throw err;
    }
  },
});
