// `quorum denoise FILE --from DIR --noise 1,4,7 [--mode partial|full] [--motion FILE …] --out FILE` –
// regresses noise components out of a run, using a `quorum decompose` output directory
// (timecourses.tsv, mask.nii.gz, summary.json for the dropped volumes); prints a JSON summary.
// --mask FILE takes the mask from elsewhere, --no-mask regresses every voxel (the denoise job on
// the cluster passes the decomposition's stored mask, or none, as the job on the worker uses it).
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { readNiftiFile } from '@/lib/nifti';
import { dropInitialVolumes } from '@/lib/decomposition/motion';
import { MOTION_USAGE, motionOptions, readMotionOption } from './motion-options';
import { denoiseImage } from '@/lib/denoise/denoise-image';
import { parseTsv } from '@/lib/exports/tabular';
import type { CliCommand } from './index';

const USAGE =
  'usage: quorum denoise FILE --from DIR --noise 1,4,7 [--mode partial|full] [--drop N] [--mask FILE | --no-mask] ' +
  `${MOTION_USAGE} --out FILE.nii.gz`;

class UsageError extends Error {}

export const denoise: CliCommand = {
  summary: 'regress noise components out of a run (partial or full) using a decompose output directory',
  usage: USAGE,
  async run(args) {
    try {
      const { values, positionals } = parseArgs({
        args,
        allowPositionals: true,
        options: {
          from: { type: 'string' },
          noise: { type: 'string' },
          mode: { type: 'string', default: 'partial' },
          drop: { type: 'string' },
          mask: { type: 'string' },
          'no-mask': { type: 'boolean', default: false },
          out: { type: 'string' },
          ...motionOptions,
        },
      });
      const file = positionals[0];
      if (!file || positionals.length > 1 || !values.from || values.noise === undefined || !values.out) throw new UsageError(USAGE);
      if (values.mode !== 'partial' && values.mode !== 'full')
        throw new UsageError(`--mode must be partial or full; got "${values.mode}".`);
      if (!/\.nii\.gz$/.test(values.out)) throw new UsageError('--out must name a .nii.gz file.');
      const noise =
        values.noise.trim() === ''
          ? []
          : values.noise.split(',').map((s) => {
              if (!/^\s*\d+\s*$/.test(s)) throw new UsageError(`--noise must list component numbers like 1,4,7; got "${values.noise}".`);
              return Number(s);
            });

      const tsv = parseTsv(await readFile(path.join(values.from, 'timecourses.tsv'), 'utf8'));
      const k = tsv.header.length;
      const T = tsv.rows.length;
      const tcs = new Float64Array(T * k);
      tsv.rows.forEach((row, t) => {
        if (row.length !== k)
          throw new UsageError(`timecourses.tsv row ${t + 2} has ${row.length} values; the header names ${k} components.`);
        row.forEach((v, c) => (tcs[t * k + c] = Number(v)));
      });
      let drop = values.drop === undefined ? undefined : Number(values.drop);
      if (drop === undefined) {
        const summary = await readFile(path.join(values.from, 'summary.json'), 'utf8')
          .then((s) => JSON.parse(s) as { droppedVolumes?: number })
          .catch(() => null);
        drop = summary?.droppedVolumes ?? 0;
      }
      if (!Number.isInteger(drop) || drop < 0) throw new UsageError(`--drop must be a whole number ≥ 0; got "${values.drop}".`);
      const image = await readNiftiFile(file);
      if (values.mask && values['no-mask']) throw new UsageError('Give --mask FILE or --no-mask, not both.');
      let mask: Uint8Array | undefined;
      if (!values['no-mask']) {
        const maskFile = values.mask ?? path.join(values.from, 'mask.nii.gz');
        const maskVol = (await readNiftiFile(maskFile)).readVolume(0);
        if (maskVol.length !== image.voxelsPerVolume)
          throw new UsageError(
            `The mask ${maskFile} has ${maskVol.length} voxels per volume; ${file} has ${image.voxelsPerVolume}. Use the mask made from this run.`,
          );
        mask = Uint8Array.from(maskVol, (v) => (v > 0 ? 1 : 0));
      }
      const full = await readMotionOption(values, image.nt);
      const motion = full ? dropInitialVolumes(full, drop) : undefined;
      const t0 = performance.now();
      const r = await denoiseImage({ image, drop, timecourses: tcs, k, noise, mode: values.mode, motion, mask, outPath: values.out });
      process.stdout.write(
        JSON.stringify(
          {
            input: path.resolve(file),
            output: path.resolve(values.out),
            mode: values.mode,
            noise,
            components: k,
            droppedVolumes: drop,
            volumes: r.volumes,
            voxelsRegressed: r.voxelsRegressed,
            regressors: r.columns,
            sha256: r.sha256,
            bytes: r.bytes,
            seconds: Number(((performance.now() - t0) / 1000).toFixed(3)),
          },
          null,
          2,
        ) + '\n',
      );
      return 0;
    } catch (err) {
      const msg = err instanceof Error ? err.message : String(err);
      process.stderr.write(`quorum denoise: ${msg.replace(/\s*\n\s*/g, ' ')}\n`);
      return err instanceof UsageError ? 2 : 1;
    }
  },
};
