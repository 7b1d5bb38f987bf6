// Decomposition benchmark, ours against scikit-learn side by side on the same file and mask.
// A realistic-size phantom run (size S: 64×64×36×300, int16 .nii.gz; BENCH_SIZE=M for 600 volumes)
// and its automatic brain mask are written once; then for each k in BENCH_K (default 40,80), each in
// a fresh process so peak RSS is its own:
//   (a) one FastICA end to end, from the NIfTI to the maps: ours (read, demean + variance-normalise,
//       T × T covariance, PCA whitening to k, FastICA log-cosh, tol 1e-4, max 200 iterations, maps)
//       and scikit-learn's FastICA(whiten='unit-variance', fun='logcosh', tol=1e-4, max_iter=200) on
//       the same voxels (scripts/reference/time-decomposition-sklearn.py --ica, run with
//       OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE unset so OpenBLAS picks its kernels for this CPU);
//   (b) our full default decomposition (decomposeRun with its defaults except components = k, then
//       the output files, as `quorum decompose --components k` does), against the reference's (a).
// Targets on the 2-core machine: (a) ours ≤ 1.0 × the reference (goal 0.5 ×); (b) ≤ 3 × the
// reference's single run. Figures depend on machine load: the 1-minute load average is printed
// beside each measurement. BENCH_REPEAT=n repeats each measurement (best time printed).
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { loadavg, tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '../..');
const child = path.join(here, 'decomposition-child.ts');
const sklearnScript = path.join(root, 'scripts/reference/time-decomposition-sklearn.py');

interface Timed<T> {
  result: T;
  load: string;
}

function node(args: string[]): string {
  return execFileSync(process.execPath, ['--import', 'tsx', child, ...args], { cwd: root, encoding: 'utf8', maxBuffer: 1 << 24 });
}

/** The reference's environment: ours less the two OpenBLAS overrides (only for this command). */
function referenceEnv(): NodeJS.ProcessEnv {
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  return env;
}

function hasSklearn(): boolean {
  if (!existsSync('/usr/bin/python3')) return false;
  try {
    execFileSync('/usr/bin/python3', ['-c', 'import sklearn, nibabel'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

/** Runs fn `repeat` times; keeps the fastest result (by its seconds) and the load beside it. */
function timed<T>(repeat: number, seconds: (r: T) => number, fn: () => T): Timed<T> {
  let best: Timed<T> | null = null;
  for (let i = 0; i < repeat; i++) {
    const before = loadavg()[0]!;
    const result = fn();
    const load = `load ${before.toFixed(1)}→${loadavg()[0]!.toFixed(1)}`;
    if (!best || seconds(result) < seconds(best.result)) best = { result, load };
  }
  return best!;
}

const s = (x: number) => `${x.toFixed(1)} s`;
const mb = (x: number) => `${x.toFixed(0)} MB`;
const conv = (c: boolean) => (c ? 'converged' : 'NOT converged');

export async function main(): Promise<void> {
  const size = process.env.BENCH_SIZE ?? 'S';
  const ks = (process.env.BENCH_K ?? '40,80')
    .split(',')
    .map((v) => Number(v.trim()))
    .filter((v) => v > 0);
  const repeat = Math.max(1, Number(process.env.BENCH_REPEAT ?? 1));
  const sk = hasSklearn();
  const dir = await mkdtemp(path.join(tmpdir(), 'quorum-bench-decomposition-'));
  try {
    const file = path.join(dir, `phantom-${size}.nii.gz`);
    const maskFile = path.join(dir, `mask-${size}.nii.gz`);
    const gen = JSON.parse(node(['gen', size, file]));
    const m = JSON.parse(node(['mask', file, maskFile]));
    console.log(
      `phantom ${size}: ${m.dims.join('×')} int16 .nii.gz, ${m.voxelsInMask} voxels in the automatic mask, ` +
        `${gen.sources} true sources (generated in ${s(gen.generateSeconds)}); 2 threads each side; BENCH_REPEAT=${repeat}`,
    );
    if (sk) {
      const py = JSON.parse(
        execFileSync(
          '/usr/bin/python3',
          [
            '-c',
            'import json, numpy, threadpoolctl; print(json.dumps([i for i in threadpoolctl.threadpool_info() if i["user_api"] == "blas"]))',
          ],
          { encoding: 'utf8', env: referenceEnv() },
        ).trim() || '[]',
      );
      if (py.length)
        console.log(
          `reference BLAS (OPENBLAS_CORETYPE, OPENBLAS_L2_SIZE unset): ${py.map((i: Record<string, unknown>) => `${i.internal_api} ${i.version}, ${i.architecture} kernels, ${i.num_threads} threads`).join('; ')}`,
        );
    } else {
      console.log(
        'scikit-learn comparison skipped: /usr/bin/python3 with sklearn and nibabel not found (apt-get install python3-sklearn python3-nibabel python3-threadpoolctl)',
      );
    }
    for (const k of ks) {
      console.log(`\n[${size} k=${k}] V=${m.voxelsInMask} T=${m.dims[3]}`);
      // (a) one FastICA end to end.
      const ours = timed(
        repeat,
        (r) => r.seconds.endToEnd,
        () => JSON.parse(node(['ica', file, maskFile, String(k)])),
      );
      const o = ours.result;
      const stages = Object.entries(o.seconds as Record<string, number>)
        .filter(([n]) => n !== 'endToEnd')
        .map(([n, v]) => `${n} ${v.toFixed(2)}`)
        .join(' · ');
      console.log(
        `  (a) one FastICA  ours          ${s(o.seconds.endToEnd).padStart(8)}  ${o.iterations} it, ${conv(o.converged)}, peak RSS ${mb(o.maxRssMb)}, kernels ${o.backend}, ${o.threads} threads  [${ours.load}]`,
      );
      console.log(`                    stages (s): ${stages}; FastICA CPU ${o.icaCpuSeconds.toFixed(1)} s over all threads`);
      let ref: number | null = null;
      if (sk) {
        const r = timed(
          repeat,
          (x) => x.total,
          () =>
            JSON.parse(
              execFileSync('/usr/bin/python3', [sklearnScript, '--ica', file, maskFile, String(k)], {
                encoding: 'utf8',
                env: referenceEnv(),
              }),
            ),
        );
        const p = r.result;
        ref = p.total;
        console.log(
          `  (a) one FastICA  scikit-learn  ${s(p.total).padStart(8)}  ${p.icaIterations} it, ${conv(p.converged)}, peak RSS ${mb(p.maxRssMb)}  [${r.load}]`,
        );
        console.log(
          `                    stages (s): read ${p.read.toFixed(2)} · preprocess ${p.preprocess.toFixed(2)} · FastICA (whitening SVD + iterations) ${p.fastica.toFixed(2)}`,
        );
        console.log(`  (a) ratio ours / scikit-learn = ${(o.seconds.endToEnd / p.total).toFixed(2)} (target ≤ 1.0, goal 0.5)`);
      }
      // (b) our full default decomposition at this k.
      const full = timed(
        repeat,
        (r) => r.seconds.endToEnd,
        () => JSON.parse(node(['full', file, maskFile, String(k), path.join(dir, `out-${k}`)])),
      );
      const f = full.result;
      const fstages = Object.entries(f.seconds as Record<string, number>)
        .filter(([n]) => n !== 'endToEnd' && n !== 'total')
        .map(([n, v]) => `${n} ${v.toFixed(2)}`)
        .join(' · ');
      console.log(
        `  (b) full default ours          ${s(f.seconds.endToEnd).padStart(8)}  ${f.iterations} it, ${conv(f.converged)}, ${f.attempts} attempt(s), peak RSS ${mb(f.maxRssMb)}  [${full.load}]`,
      );
      console.log(`                    stages (s): ${fstages}`);
      if (ref !== null)
        console.log(`  (b) ratio ours full / scikit-learn one FastICA = ${(f.seconds.endToEnd / ref).toFixed(2)} (target ≤ 3)`);
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
