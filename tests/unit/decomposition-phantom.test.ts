// The whole decomposition on the tiny phantom against scikit-learn 1.2.1 FastICA on the same data.
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { decomposeRun, type DecompositionResult } from '@/lib/decomposition/pipeline';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput } from '@/lib/phantom';
import { pearson } from './decomposition-synthetic';

interface PhantomFixture {
  library: string;
  phantom: { size: 'tiny'; seed: number; sha256: string; sources: string[] };
  components: number;
  voxels: number;
  runs: Array<{ randomState: number; bestAbsR: number[] }>;
}
// Fixture: scikit-learn 1.2.1 FastICA (logcosh, whiten='unit-variance') per-source best |r|,
// written by scripts/reference/make-decomposition-fixtures.py from the same int16 phantom file.
const fixture = JSON.parse(readFileSync('tests/fixtures/decomposition/phantom-ica.json', 'utf8')) as PhantomFixture;

const phantom = generatePhantom({ size: fixture.phantom.size, seed: fixture.phantom.seed });
const bytes = encodeNifti1(phantomToNiftiInput(phantom, { datatype: 'int16' }));
const image = decodeNifti(bytes);

function bestAbsR(r: DecompositionResult): number[] {
  const V = r.voxelsInMask;
  return phantom.truth.sources.map((s) => {
    const truth = Array.from(r.maskIndices, (i) => s.map[i]!);
    let best = 0;
    for (let c = 0; c < r.k; c++) best = Math.max(best, Math.abs(pearson(truth, r.maps.subarray(c * V, (c + 1) * V))));
    return best;
  });
}

describe(`tiny phantom vs ${fixture.library}`, () => {
  it('decodes to the very file the reference script read (SHA-256 of the NIfTI bytes)', () => {
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(fixture.phantom.sha256);
    expect(phantom.truth.sources.map((s) => s.name)).toEqual(fixture.phantom.sources);
  });

  it('matches every true source at least as well as scikit-learn FastICA (tolerance 0.02)', async () => {
    const r = await decomposeRun({ image, mask: phantom.truth.brainMask }, { components: fixture.components, seed: 1, threads: 2 });
    expect(r.voxelsInMask).toBe(fixture.voxels);
    expect(r.converged).toBe(true);
    const ours = bestAbsR(r);
    const ref = fixture.runs[0]!.bestAbsR;
    ours.forEach((v, i) => expect(v, fixture.phantom.sources[i]).toBeGreaterThanOrEqual(ref[i]! - 0.02));
  });

  it('estimates the number of components within 30 % of the true source count (automatic mask, laplace)', async () => {
    const r = await decomposeRun({ image }, { dimMethod: 'laplace', restarts: 1, threads: 2 });
    const truth = phantom.truth.sources.length;
    expect(r.dimMethod).toBe('laplace');
    expect(Math.abs(r.k - truth) / truth).toBeLessThanOrEqual(0.3);
    expect(r.dimension.effectiveSamples).toBeLessThan(r.voxelsInMask);
  });
});
