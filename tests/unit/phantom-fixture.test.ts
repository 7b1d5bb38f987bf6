import { readFileSync } from 'node:fs';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { encodeNifti1 } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, truthMapsToNiftiInput } from '@/lib/phantom';

const dir = path.resolve(__dirname, '../fixtures/phantom');

describe('committed phantom fixture (tiny, seed 1)', () => {
  const p = generatePhantom({ size: 'tiny', seed: 1 });

  it('is reproduced byte for byte by the generator', () => {
    const file = gunzipSync(readFileSync(path.join(dir, 'phantom-tiny-seed1_bold.nii.gz')));
    const made = encodeNifti1(phantomToNiftiInput(p, { datatype: 'int16', description: 'Quorum phantom tiny seed 1 (synthetic)' }));
    expect(Buffer.from(made).equals(file)).toBe(true);
    const maps = gunzipSync(readFileSync(path.join(dir, 'phantom-tiny-seed1_desc-truth_maps.nii.gz')));
    expect(Buffer.from(encodeNifti1(truthMapsToNiftiInput(p))).equals(maps)).toBe(true);
  });

  it('has truth JSON and motion TSV that match the phantom', () => {
    const truth = JSON.parse(readFileSync(path.join(dir, 'phantom-tiny-seed1_desc-truth_components.json'), 'utf8'));
    expect(truth.sources.map((s: { name: string }) => s.name)).toEqual(p.truth.sources.map((s) => s.name));
    const rows = readFileSync(path.join(dir, 'phantom-tiny-seed1_desc-motion_timeseries.tsv'), 'utf8').trim().split('\n');
    expect(rows[0].split('\t')).toEqual(['tx_mm', 'ty_mm', 'tz_mm', 'rx_rad', 'ry_rad', 'rz_rad']);
    expect(rows).toHaveLength(1 + p.dims[3]);
    expect(Number(rows[10].split('\t')[0])).toBeCloseTo(p.motion.translations[0][9], 4);
  });
});
