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
  let stdout = '',
    stderr = '';
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
    expect(summary).toMatchObject({
      components: 6,
      dimMethod: 'fixed',
      seed: 3,
      timepoints: p.dims[3] - 2,
      trSeconds: p.trSeconds,
      varianceNormalised: true,
    });
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

  it("outputs keep the input's qform/sform codes and transforms; the component axis is not time (NIfTI-1 standard, nifti1.h)", async () => {
    // A run as a DICOM converter writes it: qform_code = sform_code = 1 (NIFTI_XFORM_SCANNER_ANAT).
    // Also a qform-only header (sform_code 0), whose qform must stay the only transform.
    const dir = await mkdtemp(path.join(tmpdir(), 'quorum-decompose-codes-'));
    dirs.push(dir);
    const p = generatePhantom({ size: 'tiny', seed: 2, volumes: 40 });
    for (const codes of [
      { qformCode: 1, sformCode: 1 },
      { qformCode: 1, sformCode: 0 },
    ]) {
      const file = path.join(dir, `run-q${codes.qformCode}-s${codes.sformCode}.nii.gz`);
      await writeNiftiFile(file, { ...phantomToNiftiInput(p, { datatype: 'int16' }), ...codes });
      const input = await readNiftiFile(file);
      expect([input.header.qformCode, input.header.sformCode]).toEqual([codes.qformCode, codes.sformCode]);
      const out = path.join(dir, `out-q${codes.qformCode}-s${codes.sformCode}`);
      const res = await runCli([file, '--out', out, '--components', '4', '--seed', '1', '--threads', '1']);
      expect(res.stderr).toBe('');
      for (const name of ['components.nii.gz', 'mean.nii.gz', 'mask.nii.gz']) {
        const h = (await readNiftiFile(path.join(out, name))).header;
        expect([h.qformCode, h.sformCode], name).toEqual([codes.qformCode, codes.sformCode]);
        expect(affineMaxDiff(h.qform, input.header.qform), name).toBeLessThan(1e-4);
        expect(affineMaxDiff(h.affine, input.header.affine), name).toBeLessThan(1e-4);
        expect(h.xyztUnits & 0x07, `${name} keeps the spatial units`).toBe(input.header.xyztUnits & 0x07);
      }
      const comps = (await readNiftiFile(path.join(out, 'components.nii.gz'))).header;
      // time bits of xyzt_units (nifti1.h XYZT_TO_TIME, mask 0x38) = NIFTI_UNITS_UNKNOWN; pixdim[4] = 1 (positive, as nifti1.h asks)
      expect(input.header.xyztUnits & 0x38).not.toBe(0); // the run itself is labelled in seconds
      expect(comps.xyztUnits & 0x38).toBe(0);
      expect(comps.pixdim[4]).toBe(1);
      expect(comps.intentCode).toBe(5); // NIFTI_INTENT_ZSCORE
    }
  });

  it('features.tsv writes undefined features as n/a and has the drift, step and reproducibility columns; summary.json says reproducibility was not computed with --restarts 1', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'quorum-decompose-features-'));
    dirs.push(dir);
    const p = generatePhantom({ size: 'tiny', seed: 2, volumes: 40 });
    const file = path.join(dir, 'run.nii.gz');
    await writeNiftiFile(file, phantomToNiftiInput(p, { datatype: 'int16' }));
    const out = path.join(dir, 'out');
    // --restarts 1: a single FastICA run, so no reproducibility index (the default runs restarts)
    const res = await runCli([file, '--out', out, '--components', '4', '--seed', '1', '--threads', '1', '--restarts', '1']);
    expect(res.code).toBe(0);
    const summary = JSON.parse(res.stdout);
    expect(summary.reproducibility).toBeNull();
    expect(summary.warnings).toEqual([]);
    const lines = (await readFile(path.join(out, 'features.tsv'), 'utf8'))
      .trim()
      .split('\n')
      .map((l) => l.split('\t'));
    const header = lines[0]!;
    for (const col of ['reproducibility', 'stepScore', 'trendR2', 'mapThresholdZ', 'edgeFraction']) expect(header).toContain(col);
    const rep = header.indexOf('reproducibility');
    for (const row of lines.slice(1)) {
      expect(row[rep]).toBe('n/a'); // no restarts in this run
      expect(row[header.indexOf('motionCorrelation')]).toBe('n/a'); // no motion table
      for (const cell of row) expect(cell === 'n/a' || Number.isFinite(Number(cell)), cell).toBe(true);
    }
  });

  it('uses a motion table for the motion features', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'quorum-decompose-'));
    dirs.push(dir);
    const p = generatePhantom({ size: 'tiny', seed: 2 });
    const file = path.join(dir, 'run.nii.gz');
    await writeNiftiFile(file, phantomToNiftiInput(p, { datatype: 'int16' }));
    const rows = Array.from({ length: p.dims[3] }, (_, t) =>
      [...p.motion.translations.map((c) => c[t]!), ...p.motion.rotations.map((c) => c[t]!)].join(' '),
    );
    await writeFile(path.join(dir, 'motion.txt'), rows.join('\n') + '\n');
    const out = path.join(dir, 'out');
    const res = await runCli([
      file,
      '--out',
      out,
      '--components',
      '4',
      '--drop',
      '3',
      '--threads',
      '1',
      '--motion',
      path.join(dir, 'motion.txt'),
      '--motion-order',
      'trans-first',
      '--motion-units',
      'radians',
    ]);
    expect(res.stderr).toBe('');
    expect(JSON.parse(res.stdout).motionGiven).toBe(true);
    const lines = (await readFile(path.join(out, 'features.tsv'), 'utf8'))
      .trim()
      .split('\n')
      .map((l) => l.split('\t'));
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
