// `quorum decompose` on a small phantom file: every output file, its grid and its columns.
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { decompose } from '@/scripts/cli/decompose';
import { readNiftiFile, writeNiftiFile, affineMaxDiff } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput } from '@/lib/phantom';

const dirs: string[] = [];
afterAll(async () => {
  await Promise.all(dirs.map((d) => rm(d, { recursive: true, force: true })));
});

async function runCli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '', stderr = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((stdout += String(s)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((stderr += String(s)), true));
  try {
    const code = await decompose.run(args);
    return { code, stdout, stderr };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

describe('quorum decompose', () => {
  it('writes z-maps on the input grid, mean, mask, TSVs and the summary', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'quorum-decompose-'));
    dirs.push(dir);
    const p = generatePhantom({ size: 'tiny', seed: 2 });
    const file = path.join(dir, 'run.nii.gz');
    await writeNiftiFile(file, phantomToNiftiInput(p, { datatype: 'int16' }));
    const out = path.join(dir, 'out');
    const res = await runCli([file, '--out', out, '--components', '6', '--seed', '3', '--drop', '2', '--threads', '1']);
    expect(res.stderr).toBe('');
    expect(res.code).toBe(0);
    const summary = JSON.parse(res.stdout);
    expect(summary).toMatchObject({ components: 6, dimMethod: 'fixed', seed: 3, timepoints: p.dims[3] - 2, trSeconds: p.trSeconds, varianceNormalised: true });
    expect(JSON.parse(await readFile(path.join(out, 'summary.json'), 'utf8')).components).toBe(6);
    const comps = await readNiftiFile(path.join(out, 'components.nii.gz'));
    expect(comps.header.dims).toEqual([...p.dims.slice(0, 3), 6]);
    expect(comps.header.datatype).toBe('float32');
    expect(affineMaxDiff(comps.header.affine, p.affine)).toBeLessThan(1e-4);
    const mask = (await readNiftiFile(path.join(out, 'mask.nii.gz'))).readVolume(0);
    const map1 = comps.readVolume(0);
    let inMask = 0;
    for (let i = 0; i < mask.length; i++) {
      if (mask[i]) inMask++;
      else expect(map1[i]).toBe(0);
    }
    expect(inMask).toBe(summary.voxelsInMask);
    const tcs = (await readFile(path.join(out, 'timecourses.tsv'), 'utf8')).trim().split('\n');
    expect(tcs[0]).toBe('comp-1\tcomp-2\tcomp-3\tcomp-4\tcomp-5\tcomp-6');
    expect(tcs.length).toBe(1 + p.dims[3] - 2);
    const spectra = (await readFile(path.join(out, 'spectra.tsv'), 'utf8')).trim().split('\n');
    expect(spectra[0]!.split('\t')[0]).toBe('frequency_hz');
    const features = (await readFile(path.join(out, 'features.tsv'), 'utf8')).trim().split('\n');
    expect(features.length).toBe(7);
    expect((await readNiftiFile(path.join(out, 'mean.nii.gz'))).header.dims).toEqual(p.dims.slice(0, 3));
  });

  it('uses a motion table for the motion features', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'quorum-decompose-'));
    dirs.push(dir);
    const p = generatePhantom({ size: 'tiny', seed: 2 });
    const file = path.join(dir, 'run.nii.gz');
    await writeNiftiFile(file, phantomToNiftiInput(p, { datatype: 'int16' }));
    const rows = Array.from({ length: p.dims[3] }, (_, t) =>
      [...p.motion.translations.map((c) => c[t]!), ...p.motion.rotations.map((c) => c[t]!)].join(' '));
    await writeFile(path.join(dir, 'motion.txt'), rows.join('\n') + '\n');
    const out = path.join(dir, 'out');
    const res = await runCli([file, '--out', out, '--components', '4', '--drop', '3', '--threads', '1',
      '--motion', path.join(dir, 'motion.txt'), '--motion-order', 'trans-first', '--motion-units', 'radians']);
    expect(res.stderr).toBe('');
    expect(JSON.parse(res.stdout).motionGiven).toBe(true);
    const lines = (await readFile(path.join(out, 'features.tsv'), 'utf8')).trim().split('\n').map((l) => l.split('\t'));
    const col = lines[0]!.indexOf('motionCorrelation');
    expect(col).toBeGreaterThan(0);
    for (const row of lines.slice(1)) expect(Number(row[col])).toBeGreaterThanOrEqual(0);
    // A table with the wrong number of rows is refused.
    await writeFile(path.join(dir, 'short.txt'), rows.slice(1).join('\n') + '\n');
    const bad = await runCli([file, '--out', out, '--motion', path.join(dir, 'short.txt')]);
    expect(bad.code).toBe(1);
  });

  it('answers bad arguments and missing files with one line on stderr and exit 1', async () => {
    const bad = await runCli(['x.nii', '--out', '/tmp/never', '--dim-method', 'guess']);
    expect(bad.code).toBe(1);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    const missing = await runCli(['/nonexistent/run.nii.gz', '--out', '/tmp/never']);
    expect(missing.code).toBe(1);
    expect(missing.stderr).toMatch(/^quorum decompose: /);
    expect((await runCli([])).code).toBe(1);
  });
});
