// `quorum decompose FILE --out DIR [...]` – PCA + spatial FastICA of one run; writes z-maps, mean,
// mask, time courses, spectra, features and summary.json into DIR and prints the summary as JSON.
import { renameSync, writeFileSync } from 'node:fs';
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { assertFourD, assertSameGrid, readNiftiFile, writeNiftiFile, type NiftiHeader } from '@/lib/nifti';
import {
  componentFeatures,
  componentSpectra,
  decomposeRun,
  decompositionSummary,
  featuresTsv,
  mapsVolume,
  spectraTsv,
  timecoursesTsv,
  type DecompositionResult,
  type DimMethod,
} from '@/lib/decomposition';
import type { Contrast } from '@/lib/decomposition/fastica';
import { componentsHeaderFields, volumeHeaderFields } from '@/lib/decomposition/output-headers';
import { dropInitialVolumes, type MotionParams } from '@/lib/decomposition/motion';
import { MOTION_USAGE, motionOptions, readMotionOption } from './motion-options';
import type { CliCommand } from './index';

const USAGE =
  'usage: quorum decompose FILE --out DIR [--mask FILE] [--components auto|N] [--dim-method iid-mdl|iid-aic|laplace|aic|mdl|variance:F] ' +
  '[--seed N] [--restarts N] [--drop N] [--no-variance-norm] [--detrend] [--contrast logcosh|exp|cube] [--tol X] [--max-iter N] [--threads N] ' +
  '[--progress FILE] ' +
  MOTION_USAGE;

class UsageError extends Error {}

function integer(name: string, text: string | undefined, min: number): number | undefined {
  if (text === undefined) return undefined;
  if (!/^\d+$/.test(text) || Number(text) < min) throw new UsageError(`--${name} must be a whole number ≥ ${min}; got "${text}".`);
  return Number(text);
}

function positive(name: string, text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!(v > 0) || !Number.isFinite(v)) throw new UsageError(`--${name} must be a positive number; got "${text}".`);
  return v;
}

/**
 * For --progress FILE: writes {stage, percent, detail} as JSON (to a temporary file, then renamed,
 * so a reader never sees half a file) whenever the stage or the whole percent changes. The
 * Slurm executor's worker reads it to show the run's progress while the cluster job runs.
 */
function progressWriter(file: string | undefined) {
  if (!file) return undefined;
  let last = '';
  return (stage: string, percent: number, detail?: string) => {
    const key = `${stage} ${Math.floor(percent)}`;
    if (key === last) return;
    last = key;
    try {
      writeFileSync(`${file}.tmp`, JSON.stringify({ stage, percent, detail }));
      renameSync(`${file}.tmp`, file);
    } catch {
      // progress is a courtesy: a failed write never stops the decomposition
    }
  };
}

function dimMethodOf(text: string | undefined): DimMethod | undefined {
  if (text === undefined) return undefined;
  if (text === 'laplace' || text === 'aic' || text === 'mdl' || text === 'iid-aic' || text === 'iid-mdl') return text;
  const m = /^variance:(\d*\.?\d+)$/.exec(text);
  if (m && Number(m[1]) > 0 && Number(m[1]) <= 1) return { variance: Number(m[1]) };
  throw new UsageError(`--dim-method must be iid-mdl, iid-aic, laplace, aic, mdl or variance:F with 0 < F ≤ 1; got "${text}".`);
}

/**
 * Writes a decomposition's files into dir: components.nii.gz (4D float32 z-maps on the run's grid
 * with its qform/sform and codes, component axis not labelled as time; output-headers.ts; 0
 * outside the mask), mean.nii.gz, mask.nii.gz (uint8), timecourses.tsv, spectra.tsv
 * and features.tsv. summary.json is written by the caller.
 */
export async function writeDecompositionOutputs(out: string, h: NiftiHeader, r: DecompositionResult, motion?: MotionParams): Promise<void> {
  await mkdir(out, { recursive: true });
  const [nx, ny, nz] = r.dims;
  const volume = volumeHeaderFields(h);
  await writeNiftiFile(path.join(out, 'components.nii.gz'), {
    dims: [nx, ny, nz, r.k],
    ...componentsHeaderFields(h),
    datatype: 'float32',
    data: mapsVolume(r),
    description: 'Quorum component z-maps',
  });
  await writeNiftiFile(path.join(out, 'mean.nii.gz'), {
    dims: [nx, ny, nz],
    ...volume,
    datatype: 'float32',
    data: r.meanImage,
    description: 'Quorum temporal mean',
  });
  await writeNiftiFile(path.join(out, 'mask.nii.gz'), {
    dims: [nx, ny, nz],
    ...volume,
    datatype: 'uint8',
    data: r.mask,
    description: 'Quorum decomposition mask',
  });
  await writeFile(path.join(out, 'timecourses.tsv'), timecoursesTsv(r));
  const spectra = componentSpectra(r);
  await writeFile(path.join(out, 'spectra.tsv'), spectraTsv(spectra));
  // the run's motion table covers every volume; the features see the kept ones
  const kept = motion && r.droppedVolumes > 0 ? dropInitialVolumes(motion, r.droppedVolumes) : motion;
  await writeFile(path.join(out, 'features.tsv'), featuresTsv(r, componentFeatures(r, kept, spectra)));
}

export const decompose: CliCommand = {
  summary: 'PCA + spatial FastICA of a 4D run: z-maps, mean, mask, time courses, spectra, features, summary',
  usage: USAGE,
  async run(args) {
    try {
      const { values, positionals } = parseArgs({
        args,
        allowPositionals: true,
        options: {
          out: { type: 'string' },
          mask: { type: 'string' },
          components: { type: 'string' },
          'dim-method': { type: 'string' },
          seed: { type: 'string' },
          restarts: { type: 'string' },
          drop: { type: 'string' },
          'no-variance-norm': { type: 'boolean', default: false },
          detrend: { type: 'boolean', default: false },
          contrast: { type: 'string' },
          threads: { type: 'string' },
          tol: { type: 'string' },
          'max-iter': { type: 'string' },
          progress: { type: 'string' },
          ...motionOptions,
        },
      });
      const file = positionals[0];
      if (!file || positionals.length > 1 || !values.out) throw new UsageError(USAGE);
      const components: 'auto' | number | undefined =
        values.components === undefined || values.components === 'auto' ? 'auto' : integer('components', values.components, 1);
      const contrast = values.contrast as Contrast | undefined;
      if (contrast !== undefined && !['logcosh', 'exp', 'cube'].includes(contrast))
        throw new UsageError(`--contrast must be logcosh, exp or cube; got "${contrast}".`);
      const options = {
        components,
        dimMethod: dimMethodOf(values['dim-method']),
        seed: integer('seed', values.seed, 0),
        restarts: integer('restarts', values.restarts, 1),
        drop: integer('drop', values.drop, 0),
        varianceNorm: !values['no-variance-norm'],
        detrend: values.detrend,
        contrast,
        threads: integer('threads', values.threads, 1),
        tol: positive('tol', values.tol),
        maxIter: integer('max-iter', values['max-iter'], 1),
      };

      const tRead = performance.now();
      const image = await readNiftiFile(file);
      assertFourD(image.header, 2);
      let mask: Uint8Array | undefined;
      if (values.mask) {
        const m = await readNiftiFile(values.mask);
        assertSameGrid(image.header, m.header);
        const vol = m.readVolume(0);
        mask = new Uint8Array(vol.length);
        for (let i = 0; i < vol.length; i++) mask[i] = vol[i]! > 0 ? 1 : 0;
      }
      const motion = await readMotionOption(values, image.nt);

      const readSeconds = (performance.now() - tRead) / 1000;
      const r = await decomposeRun({ image, mask, motion }, options, progressWriter(values.progress));
      const t0 = performance.now();
      await writeDecompositionOutputs(values.out, image.header, r, motion);
      const summary = {
        input: path.resolve(file),
        ...decompositionSummary(r),
        motionGiven: motion !== undefined,
      };
      const writeSeconds = (performance.now() - t0) / 1000;
      summary.seconds = {
        read: Number(readSeconds.toFixed(3)),
        ...summary.seconds,
        write: Number(writeSeconds.toFixed(3)),
        endToEnd: Number((readSeconds + r.seconds.total! + writeSeconds).toFixed(3)),
      };
      const json = JSON.stringify(summary, null, 2);
      await writeFile(path.join(values.out, 'summary.json'), json + '\n');
      for (const w of r.warnings) process.stderr.write(`quorum decompose: warning (${w.code}): ${w.message}\n`);
      process.stdout.write(json + '\n');
      return 0;
    } catch (err) {
      const msg = err instanceof Error ? err.message : String(err);
      process.stderr.write(`quorum decompose: ${msg.replace(/\s*\n\s*/g, ' ')}\n`);
      return 1;
    }
  },
};
