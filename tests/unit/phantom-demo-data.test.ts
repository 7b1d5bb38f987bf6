import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { constants, gunzipSync } from 'node:zlib';
import { afterAll, describe, expect, it } from 'vitest';

const root = path.resolve(__dirname, '../..');
const out = mkdtempSync(path.join(tmpdir(), 'quorum-demo-data-'));
afterAll(() => rmSync(out, { recursive: true, force: true }));

describe('scripts/make-demo-data.ts', () => {
  const stdout = execFileSync(
    process.execPath,
    ['--import', 'tsx', 'scripts/make-demo-data.ts', '--out', out, '--size', 'tiny', '--runs', '6', '--with-broken'],
    {
      cwd: root,
      encoding: 'utf8',
    },
  );
  const summary = JSON.parse(stdout);

  it('writes BIDS-named runs with motion, truth and sidecars, and a JSON summary', () => {
    const names = readdirSync(out);
    for (const base of ['sub-01_ses-1_task-rest', 'sub-05_ses-1_task-rest_run-1', 'sub-05_ses-1_task-rest_run-2']) {
      for (const suffix of [
        '_bold.nii.gz',
        '_bold.json',
        '_desc-motion_timeseries.tsv',
        '_desc-truth_components.json',
        '_desc-truth_maps.nii.gz',
      ]) {
        expect(names).toContain(base + suffix);
      }
    }
    expect(summary.runs).toHaveLength(6);
    expect(new Set(summary.runs.map((r: { seed: number }) => r.seed)).size).toBe(6);
    expect(summary.files.length).toBe(names.length);
    const bold = gunzipSync(readFileSync(path.join(out, 'sub-01_ses-1_task-rest_bold.nii.gz')));
    expect(bold.readInt32LE(0)).toBe(348);
    expect(bold.readInt16LE(40 + 2 * 4)).toBe(80); // dim[4] = volumes (nifti1.h: dim at offset 40)
    const truth = JSON.parse(readFileSync(path.join(out, 'sub-01_ses-1_task-rest_desc-truth_components.json'), 'utf8'));
    expect(truth.sources.some((s: { kind: string }) => s.kind === 'signal')).toBe(true);
  });

  it('writes the truncated sub-12 file: its header is readable but the gzip stream ends early', () => {
    const gz = readFileSync(path.join(out, 'sub-12_ses-1_task-rest_bold.nii.gz'));
    expect(() => gunzipSync(gz)).toThrow();
    const partial = gunzipSync(gz, { finishFlush: constants.Z_SYNC_FLUSH });
    expect(partial.readInt32LE(0)).toBe(348);
    const [, nx, ny, nz, nt] = Array.from({ length: 5 }, (_, i) => partial.readInt16LE(40 + 2 * i));
    expect(partial.length).toBeGreaterThan(352);
    expect(partial.length).toBeLessThan(352 + 2 * nx * ny * nz * nt); // cut mid-data (int16)
    expect(summary.broken.keptBytes).toBeLessThan(summary.broken.fullBytes);
  });
});
