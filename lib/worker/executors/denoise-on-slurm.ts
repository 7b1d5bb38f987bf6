/**
 * The denoise job on Slurm: the worker gathers what only the database knows (the component time
 * courses, the noise list, the dropped volumes) into the job's cluster folder as timecourses.tsv,
 * the node runs `quorum denoise` on the run's file in shared storage with the decomposition's
 * stored mask (or --no-mask) and the run's motion table, and the worker moves the output into
 * denoised/ and hashes it — so the stored file is the one the worker itself would have written.
 */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { copyFile, mkdir, rm, stat, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { ensureDirFor, newKey } from '@/lib/storage';
import { PermanentJobError } from '@/lib/jobs/errors';
import type { JobContext } from '../types';
import { clusterPathFor, runOnSlurm } from './run-on-slurm';
import type { SlurmSettings } from './settings';

export interface DenoiseForCluster {
  fileKey: string;
  maskKey: string | null;
  /** The run's motion table, when motion regressors are asked for. */
  motion: { key: string; order: 'rot-first' | 'trans-first'; units: 'radians' | 'degrees' } | null;
  /** Time-major T × k time courses, as stored (float32). */
  timecourses: Float32Array;
  k: number;
  noise: number[];
  drop: number;
  mode: 'partial' | 'full';
}

/** timecourses.tsv as `quorum decompose` writes it: a header of k names, then T rows. Each float32
 * value is printed in the shortest form that reads back to the same number (ECMAScript
 * Number::toString; -0 kept as "-0"), so the node fits the very values the worker would. */
export function timecoursesTsv(tcs: Float32Array, k: number): string {
  const T = tcs.length / k;
  const lines = [Array.from({ length: k }, (_, c) => `component_${c + 1}`).join('\t')];
  for (let t = 0; t < T; t++)
    lines.push(Array.from(tcs.subarray(t * k, (t + 1) * k), (v) => (Object.is(v, -0) ? '-0' : String(v))).join('\t'));
  return lines.join('\n') + '\n';
}

async function sha256Of(file: string): Promise<string> {
  const h = createHash('sha256');
  for await (const chunk of createReadStream(file)) h.update(chunk as Buffer);
  return h.digest('hex');
}

/** Runs the denoising on the cluster; returns the stored key, the output's checksum and size. */
export async function denoiseOnSlurm(
  ctx: JobContext<unknown>,
  settings: SlurmSettings,
  input: DenoiseForCluster,
): Promise<{ key: string; sha256: string; bytes: number; clusterJobId: string }> {
  const { folders, clusterJobId } = await runOnSlurm(ctx, settings, {
    prepare: async (f) => {
      await mkdir(path.join(f.local, 'from'), { recursive: true });
      await writeFile(path.join(f.local, 'from', 'timecourses.tsv'), timecoursesTsv(input.timecourses, input.k));
    },
    args: (f) => [
      'denoise',
      clusterPathFor(input.fileKey, settings),
      '--from',
      path.posix.join(f.cluster, 'from'),
      '--noise',
      input.noise.join(','),
      '--mode',
      input.mode,
      '--drop',
      String(input.drop),
      ...(input.maskKey ? ['--mask', clusterPathFor(input.maskKey, settings)] : ['--no-mask']),
      ...(input.motion
        ? [
            '--motion',
            clusterPathFor(input.motion.key, settings),
            '--motion-order',
            input.motion.order,
            '--motion-units',
            input.motion.units,
          ]
        : []),
      '--out',
      path.posix.join(f.cluster, 'denoised.nii.gz'),
    ],
  });
  await ctx.progress('storing', 95, `Cluster job ${clusterJobId} finished; storing the denoised run.`);
  const out = path.join(folders.local, 'denoised.nii.gz');
  const bytes = await stat(out).then(
    (s) => s.size,
    () => null,
  );
  if (bytes === null)
    throw new PermanentJobError(
      `Cluster job ${clusterJobId} completed but left no denoised file in ${folders.local}; see its stderr.txt there.`,
    );
  const key = newKey('denoised', '.nii.gz');
  await copyFile(out, await ensureDirFor(key));
  await rm(out, { force: true });
  return { key, sha256: await sha256Of(await ensureDirFor(key)), bytes, clusterJobId };
}
