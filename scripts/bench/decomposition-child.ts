// Child process of the decomposition benchmark (a fresh process per step, so peak RSS is the
// step's own). Modes:
//   gen SIZE FILE   write the phantom of SIZE (seed 1) as int16 NIfTI (gz by extension)
//   run FILE OUTDIR read FILE, decomposeRun, write the outputs; print figures as one JSON line
import { readNiftiFile, writeNiftiFile } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, type PhantomSize } from '@/lib/phantom';
import { decomposeRun } from '@/lib/decomposition';
import { writeDecompositionOutputs } from '../cli/decompose';

const [mode, a, b] = process.argv.slice(2);
if (mode === 'gen' && a && b) {
  const t0 = performance.now();
  const p = generatePhantom({ size: a as PhantomSize, seed: 1 });
  const t1 = performance.now();
  await writeNiftiFile(b, phantomToNiftiInput(p, { datatype: 'int16' }));
  process.stdout.write(JSON.stringify({ generateSeconds: (t1 - t0) / 1000, writeSeconds: (performance.now() - t1) / 1000, sources: p.truth.sources.length }) + '\n');
} else if (mode === 'run' && a && b) {
  const t0 = performance.now();
  const image = await readNiftiFile(a);
  const read = (performance.now() - t0) / 1000;
  const r = await decomposeRun({ image }, {});
  const t2 = performance.now();
  await writeDecompositionOutputs(b, image.header, r);
  const write = (performance.now() - t2) / 1000;
  process.stdout.write(JSON.stringify({
    seconds: { read, ...r.seconds, write, endToEnd: (performance.now() - t0) / 1000 },
    k: r.k, voxelsInMask: r.voxelsInMask, timepoints: r.timepoints, iterations: r.iterations, converged: r.converged,
    threads: r.threads, maxRssMb: process.resourceUsage().maxRSS / 1024,
  }) + '\n');
} else {
  process.stderr.write('usage: decomposition-child.ts gen SIZE FILE | run FILE OUTDIR\n');
  process.exit(2);
}
