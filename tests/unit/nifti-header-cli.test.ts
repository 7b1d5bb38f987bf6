// `quorum header` command: JSON on stdout, one-line error on stderr, exit codes. Expected facts come
// from nibabel 5.0.0 via tests/fixtures/nifti/reference.json.
import { readFileSync } from 'node:fs';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { header } from '@/scripts/cli/header';

const DIR = 'tests/fixtures/nifti/';
const ref = JSON.parse(readFileSync(DIR + 'reference.json', 'utf8')) as {
  cases: { file: string; dims: number[]; values: (number | string)[] }[];
};

async function runCaptured(args: string[]) {
  let stdout = '';
  let stderr = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((c: string | Uint8Array) => ((stdout += String(c)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => ((stderr += String(c)), true));
  try {
    const code = await header.run(args);
    return { code, stdout, stderr };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

afterEach(() => vi.restoreAllMocks());

describe('quorum header', () => {
  it('prints the header facts of a gzip NIfTI-2 file', async () => {
    const { code, stdout, stderr } = await runCaptured([DIR + 'n2-float32-le.nii.gz']);
    expect(code).toBe(0);
    expect(stderr).toBe('');
    const j = JSON.parse(stdout);
    expect(Object.keys(j)).toEqual([
      'version',
      'dims',
      'pixdim',
      'datatype',
      'datatypeCode',
      'bitpix',
      'littleEndian',
      'voxOffset',
      'sclSlope',
      'sclInter',
      'spaceUnits',
      'timeUnits',
      'trSeconds',
      'qformCode',
      'sformCode',
      'affine',
      'description',
    ]);
    expect(j).toMatchObject({
      version: 2,
      dims: [5, 4, 3, 2],
      datatype: 'float32',
      datatypeCode: 16,
      voxOffset: 544,
      trSeconds: 2,
      sformCode: 3,
    });
    expect(j.summary).toBeUndefined();
  });

  it('--summary gives min/max/mean of finite values and counts NaN/Inf (nibabel 5.0.0 values)', async () => {
    const c = ref.cases.find((x) => x.file === 'nonfinite.nii')!;
    const finite = c.values.filter((v): v is number => typeof v === 'number');
    const { code, stdout } = await runCaptured([DIR + c.file, '--summary']);
    expect(code).toBe(0);
    const s = JSON.parse(stdout).summary;
    expect(s.nonFinite).toBe(c.values.length - finite.length);
    expect(s.min).toBe(Math.min(...finite));
    expect(s.max).toBe(Math.max(...finite));
    expect(s.mean).toBeCloseTo(finite.reduce((a, b) => a + b, 0) / finite.length, 9);
  });

  it('fails with one line on stderr and exit 1 for a non-NIfTI file, a missing file, or bad usage', async () => {
    for (const args of [['package.json'], [DIR + 'missing.nii'], []]) {
      const { code, stdout, stderr } = await runCaptured(args);
      expect(code).toBe(1);
      expect(stdout).toBe('');
      expect(stderr).toMatch(/^quorum header: .+\n$/);
      expect(stderr.split('\n').length).toBe(2);
    }
  });
});
