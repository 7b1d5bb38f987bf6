// Decomposition benchmark: phantom runs of sizes S (64×64×36×300), M (64×64×36×600) and
// L (91×109×91×400) written as int16 .nii.gz, then read + decomposed + written in a fresh process
// (stage seconds, end-to-end, peak RSS), and the same file through scikit-learn when
// /usr/bin/python3 has it. BENCH_SIZES=S,M,L chooses sizes. Targets on the 2-core machine:
// S ≤ 6 s end-to-end and no slower than scikit-learn; L ≤ 60 s with peak RSS ≤ 2.5 GB.
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '../..');
const child = path.join(here, 'decomposition-child.ts');
const sklearnScript = path.join(root, 'scripts/reference/time-decomposition-sklearn.py');

function node(args: string[]): string {
  return execFileSync(process.execPath, ['--import', 'tsx', child, ...args], { cwd: root, encoding: 'utf8', maxBuffer: 1 << 24 });
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

export async function main(): Promise<void> {
  const sizes = (process.env.BENCH_SIZES ?? 'S,M,L').split(',').map((s) => s.trim()).filter(Boolean);
  const sk = hasSklearn();
  const dir = await mkdtemp(path.join(tmpdir(), 'quorum-bench-decomposition-'));
  try {
    for (const size of sizes) {
      const file = path.join(dir, `phantom-${size}.nii.gz`);
      const gen = JSON.parse(node(['gen', size, file]));
      console.log(`[${size}] phantom: generated in ${gen.generateSeconds.toFixed(1)} s, written in ${gen.writeSeconds.toFixed(1)} s, ${gen.sources} true sources`);
      const out = path.join(dir, `out-${size}`);
      const r = JSON.parse(node(['run', file, out]));
      const stages = Object.entries(r.seconds as Record<string, number>)
        .filter(([k]) => k !== 'total' && k !== 'endToEnd')
        .map(([k, v]) => `${k} ${v.toFixed(2)}`)
        .join(' · ');
      console.log(`[${size}] V=${r.voxelsInMask} T=${r.timepoints} k=${r.k} iterations=${r.iterations} converged=${r.converged} threads=${r.threads}`);
      console.log(`[${size}] stages (s): ${stages}`);
      console.log(`[${size}] end-to-end ${r.seconds.endToEnd.toFixed(2)} s (decomposition ${r.seconds.total.toFixed(2)} s), peak RSS ${r.maxRssMb.toFixed(0)} MB`);
      if (sk) {
        const py = JSON.parse(execFileSync('/usr/bin/python3', [sklearnScript, file, path.join(out, 'mask.nii.gz'), String(r.k)], { encoding: 'utf8' }));
        console.log(`[${size}] ${py.library}: read ${py.read.toFixed(2)} · preprocess ${py.preprocess.toFixed(2)} · PCA mle ${py.pcaMle.toFixed(2)} (k=${py.mleComponents}) · FastICA ${py.fastica.toFixed(2)} (${py.icaIterations} it) = ${py.total.toFixed(2)} s`);
        console.log(`[${size}] ratio ours / scikit-learn = ${(r.seconds.endToEnd / py.total).toFixed(2)}`);
      } else {
        console.log(`[${size}] scikit-learn comparison skipped: /usr/bin/python3 with sklearn and nibabel not found`);
      }
      await rm(file, { force: true });
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
