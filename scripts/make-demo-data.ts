// Demo-data generator: writes the invented study "Evening light and sleep — resting state" of the
// (invented) Fernhollow Imaging Core as BIDS-named phantom runs with motion files and ground truth.
//
//   npm run -s demo-data -- --out DIR [--size small|tiny|S|M|L] [--runs 12] [--seed 1]
//                           [--datatype int16|float32] [--with-broken] [--fixture]
//
// Per run (all in DIR, flat, so they can be dragged into the upload area together):
//   <base>_bold.nii.gz                      4D phantom, NIfTI-1 gz (int16, scl_slope 1 by default)
//   <base>_bold.json                        RepetitionTime, TaskName
//   <base>_desc-motion_timeseries.tsv/.json the simulated head motion (see MOTION_COLUMNS)
//   <base>_desc-truth_components.json       the true sources: names, kinds, noise kinds, time courses
//   <base>_desc-truth_maps.nii.gz           the true maps, one volume per source in that order
// With --with-broken, also sub-12_ses-1_task-rest_bold.nii.gz: a real run whose gzip stream is cut
// half way through the voxel data (an interrupted copy), for the refused upload in the walkthrough.
// With --fixture, writes only one run named phantom-<size>-seed<seed> with exactly --seed (no study
// files): that is how tests/fixtures/phantom/ is made (--size tiny --seed 1).
// Prints a JSON summary (files, bytes, seconds) on stdout.
import { mkdir, writeFile, stat } from 'node:fs/promises';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { gzipSync } from 'node:zlib';
import { encodeNifti1, writeNiftiFile } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, truthMapsToNiftiInput, truthSummary, type Phantom, type PhantomSize } from '@/lib/phantom';

const STUDY = 'Evening light and sleep — resting state';
const FACILITY = 'Fernhollow Imaging Core';
const SIZES: PhantomSize[] = ['tiny', 'small', 'XS', 'S', 'M', 'L'];

/** Motion file header: translations in mm, then rotations in radians (about x, y, z). */
export const MOTION_COLUMNS = ['tx_mm', 'ty_mm', 'tz_mm', 'rx_rad', 'ry_rad', 'rz_rad'] as const;

interface RunName {
  sub: string;
  ses: string;
  run?: string;
}

/** The study's first twelve runs: sub-01…09, two with a second session, one with two runs. */
const STUDY_RUNS: RunName[] = [
  { sub: '01', ses: '1' },
  { sub: '02', ses: '1' },
  { sub: '03', ses: '1' },
  { sub: '04', ses: '1' },
  { sub: '05', ses: '1', run: '1' },
  { sub: '05', ses: '1', run: '2' },
  { sub: '06', ses: '1' },
  { sub: '06', ses: '2' },
  { sub: '07', ses: '1' },
  { sub: '08', ses: '1' },
  { sub: '08', ses: '2' },
  { sub: '09', ses: '1' },
];

/** Run names for n runs: the study list, then sub-10, sub-11, sub-13, … (sub-12 is the broken file). */
function runNames(n: number): RunName[] {
  const out = STUDY_RUNS.slice(0, n);
  for (let s = 10; out.length < n; s++) if (s !== 12) out.push({ sub: String(s).padStart(2, '0'), ses: '1' });
  return out;
}

function baseName(r: RunName): string {
  return `sub-${r.sub}_ses-${r.ses}_task-rest${r.run ? `_run-${r.run}` : ''}`;
}

function motionTsv(p: Phantom): string {
  const cols = [...p.motion.translations, ...p.motion.rotations];
  const lines = [MOTION_COLUMNS.join('\t')];
  for (let t = 0; t < p.dims[3]; t++) lines.push(cols.map((c, i) => c[t].toFixed(i < 3 ? 5 : 7)).join('\t'));
  return lines.join('\n') + '\n';
}

const MOTION_SIDECAR = {
  Description: 'Simulated rigid-body head motion of a synthetic phantom run, one row per volume.',
  tx_mm: { Description: 'Translation along x (left to right)', Units: 'mm' },
  ty_mm: { Description: 'Translation along y (posterior to anterior)', Units: 'mm' },
  tz_mm: { Description: 'Translation along z (inferior to superior)', Units: 'mm' },
  rx_rad: { Description: 'Rotation about the x axis', Units: 'rad' },
  ry_rad: { Description: 'Rotation about the y axis', Units: 'rad' },
  rz_rad: { Description: 'Rotation about the z axis', Units: 'rad' },
};

const CAUTION = 'Synthetic data invented for a demonstration; not from any person. Research software, not for clinical use.';

const USAGE =
  'usage: npm run -s demo-data -- --out DIR [--size tiny|small|S|M|L] [--runs 12] [--seed 1] [--datatype int16|float32] [--with-broken] [--fixture]';

async function main(): Promise<number> {
  const args = process.argv.slice(2);
  if (args.includes('--help') || args.includes('-h')) {
    process.stdout.write(`synthetic BIDS-named phantom runs with motion tables and ground truth\n${USAGE}\n`);
    return 0;
  }
  const fail = (msg: string): number => {
    process.stderr.write(`make-demo-data: ${msg}\n${USAGE}\n`);
    return 2;
  };
  let parsed;
  try {
    parsed = parseArgs({
      args,
      options: {
        out: { type: 'string' },
        size: { type: 'string', default: 'small' },
        runs: { type: 'string', default: '12' },
        seed: { type: 'string', default: '1' },
        datatype: { type: 'string', default: 'int16' },
        'with-broken': { type: 'boolean', default: false },
        fixture: { type: 'boolean', default: false },
      },
    });
  } catch (err) {
    return fail(err instanceof Error ? err.message.split('.')[0]! + '.' : String(err));
  }
  const { values } = parsed;
  if (!values.out) return fail('give --out DIR (the folder to write the runs into).');
  const size = values.size as PhantomSize;
  if (!SIZES.includes(size)) return fail(`--size must be one of ${SIZES.join(', ')}; got "${values.size}".`);
  const nRuns = Number(values.runs);
  if (!Number.isInteger(nRuns) || nRuns < 0 || nRuns > 200) return fail(`--runs must be an integer 0..200; got "${values.runs}".`);
  const seed = Number(values.seed);
  if (!Number.isInteger(seed) || seed < 0) return fail(`--seed must be a non-negative integer; got "${values.seed}".`);
  const datatype = values.datatype as 'int16' | 'float32';
  if (datatype !== 'int16' && datatype !== 'float32') return fail(`--datatype must be int16 or float32; got "${values.datatype}".`);

  const outDir = path.resolve(values.out);
  await mkdir(outDir, { recursive: true });
  const started = performance.now();
  const files: Array<{ file: string; bytes: number }> = [];
  const runs: Array<{ base: string; seed: number; seconds: number }> = [];
  const put = async (name: string, write: (p: string) => Promise<void>) => {
    const full = path.join(outDir, name);
    await write(full);
    files.push({ file: name, bytes: (await stat(full)).size });
  };
  const putText = (name: string, text: string) => put(name, (p) => writeFile(p, text));

  const fixture = values.fixture === true;
  if (!fixture)
    await putText(
      'dataset_description.json',
      JSON.stringify(
        {
          Name: `${STUDY} (synthetic)`,
          BIDSVersion: '1.9.0',
          DatasetType: 'raw',
          Authors: [FACILITY],
          GeneratedBy: [{ Name: 'Quorum demo-data generator' }],
          HowToAcknowledge: CAUTION,
        },
        null,
        2,
      ) + '\n',
    );

  let dims: number[] = [];
  let trSeconds = 0;
  const plan = fixture
    ? [{ base: `phantom-${size}-seed${seed}`, runSeed: seed }]
    : runNames(nRuns).map((r, i) => ({ base: baseName(r), runSeed: seed * 1000 + i + 1 }));
  for (const { base, runSeed } of plan) {
    const t0 = performance.now();
    const p = generatePhantom({ size, seed: runSeed });
    dims = [...p.dims];
    trSeconds = p.trSeconds;
    const description = `Quorum phantom ${size} seed ${runSeed} (synthetic)`;
    await put(`${base}_bold.nii.gz`, (f) => writeNiftiFile(f, phantomToNiftiInput(p, { datatype, description })));
    await putText(
      `${base}_bold.json`,
      JSON.stringify({ RepetitionTime: p.trSeconds, TaskName: 'rest', Description: CAUTION }, null, 2) + '\n',
    );
    await putText(`${base}_desc-motion_timeseries.tsv`, motionTsv(p));
    await putText(`${base}_desc-motion_timeseries.json`, JSON.stringify(MOTION_SIDECAR, null, 2) + '\n');
    await putText(
      `${base}_desc-truth_components.json`,
      JSON.stringify({ ...truthSummary(p), study: STUDY, run: base, caution: CAUTION }) + '\n',
    );
    await put(`${base}_desc-truth_maps.nii.gz`, (f) => writeNiftiFile(f, truthMapsToNiftiInput(p)));
    runs.push({ base, seed: runSeed, seconds: Number(((performance.now() - t0) / 1000).toFixed(2)) });
  }

  let broken: { file: string; fullBytes: number; keptBytes: number } | undefined;
  if (values['with-broken'] && !fixture) {
    const p = generatePhantom({ size, seed: seed * 1000 + 12 });
    const gz = gzipSync(encodeNifti1(phantomToNiftiInput(p, { datatype })), { level: 6 });
    const kept = Math.floor(gz.length / 2);
    const file = 'sub-12_ses-1_task-rest_bold.nii.gz';
    await put(file, (f) => writeFile(f, gz.subarray(0, kept)));
    broken = { file, fullBytes: gz.length, keptBytes: kept };
  }

  const summary = {
    study: STUDY,
    facility: FACILITY,
    outDir,
    size,
    dims,
    trSeconds,
    datatype,
    runs,
    broken,
    files,
    totalBytes: files.reduce((a, f) => a + f.bytes, 0),
    seconds: Number(((performance.now() - started) / 1000).toFixed(2)),
  };
  process.stdout.write(JSON.stringify(summary, null, 2) + '\n');
  return 0;
}

main().then(
  (code) => process.exit(code),
  (err) => {
    process.stderr.write(`make-demo-data: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`);
    process.exit(1);
  },
);
