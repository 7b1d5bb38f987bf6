// `quorum denoise`: a `quorum decompose` directory of the tiny phantom → a denoised NIfTI whose
// removed components leave no share in it (partial regression, REFERENCES.md component regression).
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, expect, it, vi } from 'vitest';
import { generatePhantom, phantomToNiftiInput } from '@/lib/phantom';
import { readNiftiFile, writeNiftiFile } from '@/lib/nifti';
import { decompose } from '@/scripts/cli/decompose';
import { denoise } from '@/scripts/cli/denoise';

const dir = await mkdtemp(path.join(os.tmpdir(), 'quorum-denoise-cli-'));
afterAll(() => rm(dir, { recursive: true, force: true }));

it('denoises from a decompose output directory and refuses bad arguments with exit code 2', async () => {
  const out = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
  const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
  try {
    const p = generatePhantom({ size: 'tiny', seed: 1 });
    const bold = path.join(dir, 'sub-01_task-rest_bold.nii.gz');
    await writeNiftiFile(bold, phantomToNiftiInput(p));
    expect(await decompose.run([bold, '--out', path.join(dir, 'dec'), '--drop', '2', '--threads', '1'])).toBe(0);
    const clean = path.join(dir, 'clean.nii.gz');
    expect(await denoise.run([bold, '--from', path.join(dir, 'dec'), '--noise', '1,3', '--out', clean])).toBe(0);
    const summary = JSON.parse(String(out.mock.calls.at(-1)![0]));
    expect(summary).toMatchObject({ mode: 'partial', noise: [1, 3], droppedVolumes: 2, volumes: p.dims[3] - 2 });
    const img = await readNiftiFile(clean);
    expect([img.nx, img.ny, img.nz, img.nt]).toEqual([...p.dims.slice(0, 3), p.dims[3] - 2]);
    // --mask naming the folder's own mask is the default; --no-mask regresses every voxel
    expect(
      await denoise.run([
        bold,
        '--from',
        path.join(dir, 'dec'),
        '--noise',
        '1,3',
        '--mask',
        path.join(dir, 'dec', 'mask.nii.gz'),
        '--out',
        clean,
      ]),
    ).toBe(0);
    expect(JSON.parse(String(out.mock.calls.at(-1)![0])).sha256).toBe(summary.sha256);
    expect(await denoise.run([bold, '--from', path.join(dir, 'dec'), '--noise', '1,3', '--no-mask', '--out', clean])).toBe(0);
    const everyVoxel = JSON.parse(String(out.mock.calls.at(-1)![0]));
    expect(everyVoxel.voxelsRegressed).toBe(p.dims[0] * p.dims[1] * p.dims[2]);
    expect(summary.voxelsRegressed).toBeLessThan(everyVoxel.voxelsRegressed);
    expect(
      await denoise.run([
        bold,
        '--from',
        path.join(dir, 'dec'),
        '--noise',
        '1,3',
        '--no-mask',
        '--mask',
        path.join(dir, 'dec', 'mask.nii.gz'),
        '--out',
        clean,
      ]),
    ).toBe(2);
    expect(String(err.mock.calls.at(-1)![0])).toMatch(/--mask FILE or --no-mask, not both/);
    expect(await denoise.run([bold, '--from', path.join(dir, 'dec'), '--noise', 'a,b', '--out', clean])).toBe(2);
    expect(await denoise.run([bold, '--from', path.join(dir, 'dec'), '--noise', '99', '--out', clean])).toBe(1);
    expect(String(err.mock.calls.at(-1)![0])).toMatch(/Component 99 is not between 1 and/);
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
});
