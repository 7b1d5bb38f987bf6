// The whole decomposition with the WebAssembly kernels (default) against the same decomposition
// with the JavaScript reference kernels (QUORUM_KERNELS=js) on the phantom: the float32 storage and
// the fast tanh must not change what a rater sees.
import { afterEach, describe, expect, it } from 'vitest';
import { decomposeRun, type DecompositionResult } from '@/lib/decomposition/pipeline';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput } from '@/lib/phantom';
import { pearson } from './decomposition-synthetic';

const phantom = generatePhantom({ size: 'tiny', seed: 1 });
const image = decodeNifti(encodeNifti1(phantomToNiftiInput(phantom, { datatype: 'int16' })));
const k = phantom.truth.sources.length;

async function run(kernels: 'wasm' | 'js'): Promise<DecompositionResult> {
  process.env.QUORUM_KERNELS = kernels;
  return decomposeRun({ image, mask: phantom.truth.brainMask }, { components: k, seed: 1, threads: 2 });
}
afterEach(() => {
  delete process.env.QUORUM_KERNELS;
});

function bestAbsR(r: DecompositionResult, target: ArrayLike<number>): number {
  const V = r.voxelsInMask;
  let best = 0;
  for (let c = 0; c < r.k; c++) best = Math.max(best, Math.abs(pearson(target, r.maps.subarray(c * V, (c + 1) * V))));
  return best;
}

describe('decomposition with WebAssembly kernels vs JavaScript reference kernels (tiny phantom)', () => {
  it('finds every true source as well (|r| within 0.01) and the same components (matched |r| ≥ 0.99)', async () => {
    const js = await run('js');
    const wasm = await run('wasm');
    expect(wasm.converged).toBe(js.converged);
    // Tolerances: 0.01 in |r| with the true map, 0.99 between matched maps — common practice for
    // "same component" in ICA comparisons, no source; float32 rounding alone is ~1e-6.
    for (const s of phantom.truth.sources) {
      const truth = Array.from(js.maskIndices, (i) => s.map[i]!);
      expect(Math.abs(bestAbsR(wasm, truth) - bestAbsR(js, truth)), s.name).toBeLessThanOrEqual(0.01);
    }
    const V = js.voxelsInMask;
    for (let c = 0; c < js.k; c++)
      expect(bestAbsR(wasm, js.maps.subarray(c * V, (c + 1) * V)), `component ${c + 1}`).toBeGreaterThanOrEqual(0.99);
  }, 120_000);
});
