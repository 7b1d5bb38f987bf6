// The decomposition on the realistic phantom (smooth, autocorrelated noise; 27 sources): automatic
// dimensionality, reproducibility index across restarts, determinism across threads, and the
// non-convergence policy.
import { describe, expect, it } from 'vitest';
import { decompositionSummary } from '@/lib/decomposition/component-outputs';
import { decomposeRun, type DecompositionResult } from '@/lib/decomposition/pipeline';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, type Phantom } from '@/lib/phantom';
import { pearson } from './decomposition-synthetic';

function imageOf(p: Phantom) {
  return decodeNifti(encodeNifti1(phantomToNiftiInput(p)));
}

/** Per truth source: its best-matching component and |r| between the truth map and the z-map. */
function matches(p: Phantom, r: DecompositionResult): Array<{ name: string; component: number; r: number }> {
  const V = r.voxelsInMask;
  return p.truth.sources.map((s) => {
    const truth = Array.from(r.maskIndices, (i) => s.map[i]!);
    let best = 0,
      component = -1;
    for (let c = 0; c < r.k; c++) {
      const v = Math.abs(pearson(truth, r.maps.subarray(c * V, (c + 1) * V)));
      if (v > best) {
        best = v;
        component = c;
      }
    }
    return { name: s.name, component, r: best };
  });
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
};

describe('realistic phantom, S size (64 × 64 × 36, 300 volumes, 27 sources)', () => {
  // Every one of the 27 sources is above the noise floor at this size: given k = 40 each is found
  // at |r| ≥ 0.44 (scripts/bench/dimensionality.ts prints the matches).
  const p = generatePhantom({ size: 'S', seed: 1 });
  const sources = p.truth.sources.length;

  it('default dimensionality (iid-mdl; Li, Adali & Calhoun 2007) is within 30 % of the 27 sources and below its bound', async () => {
    expect(p.model).toBe('realistic');
    expect(sources).toBe(27);
    const r = await decomposeRun({ image: imageOf(p), mask: p.truth.brainMask }, { restarts: 1, threads: 2 });
    expect(r.dimMethod).toBe('iid-mdl');
    expect(r.dimension.range[1]).toBe(Math.min(Math.floor(300 / 3), 100));
    expect(Math.abs(r.k - sources) / sources).toBeLessThanOrEqual(0.3);
    expect(r.dimension.atBound).toBe(false);
    expect(r.warnings.map((w) => w.code)).not.toContain('dimension_at_bound');
    // The kept voxels are nearly independent: lag correlation of the noise at the chosen depth ≤ 0.14.
    for (const rho of r.iidSubsampling!.lagCorrelation) expect(Math.abs(rho)).toBeLessThanOrEqual(0.14);
    // What the old default does here (why it changed): Minka's evidence with the smoothness-corrected
    // N overshoots far past the sources on smooth, autocorrelated noise, as it did on a real run.
    expect(r.dimension.estimates.laplace).toBeGreaterThan(1.5 * sources);
  }, 120_000);
});

describe('realistic phantom, small grid (32 × 32 × 20, 160 volumes): reproducibility index', () => {
  const p = generatePhantom({ size: 'small', seed: 1, model: 'realistic', volumes: 160 });
  const image = imageOf(p);

  it('true sources reproduce (index ≥ 0.9); components fitting noise score lower', async () => {
    // k = 30 > the sources this grid resolves, so some components must fit noise.
    const r = await decomposeRun({ image, mask: p.truth.brainMask }, { components: 30, seed: 1, threads: 2 });
    expect(r.restarts!.runs).toBe(5);
    expect(r.reproducibility).not.toBeNull();
    const rep = r.reproducibility!;
    for (const v of rep) {
      expect(v).toBeGreaterThanOrEqual(0);
      expect(v).toBeLessThanOrEqual(1);
    }
    const m = matches(p, r);
    const found = m.filter((x) => x.r >= 0.6);
    expect(found.length).toBeGreaterThanOrEqual(12);
    for (const f of found) expect(rep[f.component]!, `${f.name} (|r| ${f.r.toFixed(2)})`).toBeGreaterThanOrEqual(0.9);
    const sourceComponents = new Set(m.filter((x) => x.r >= 0.5).map((x) => x.component));
    const noiseFitting = Array.from({ length: r.k }, (_, c) => c).filter((c) => !sourceComponents.has(c));
    expect(noiseFitting.length).toBeGreaterThanOrEqual(4);
    const noiseRep = noiseFitting.map((c) => rep[c]!);
    expect(median(noiseRep)).toBeLessThan(0.85);
    expect(median(noiseRep)).toBeLessThan(median(found.map((f) => rep[f.component]!)) - 0.1);
    // summary.json carries the index per component and the restarts behind it.
    const summary = decompositionSummary(r);
    expect(summary.reproducibility).toHaveLength(30);
    expect(summary.restarts!.seeds).toEqual([1, 2, 3, 4, 5]);
  }, 180_000);

  it('is deterministic for a seed on 1 and 2 threads (maps, index, k)', async () => {
    const opts = { components: 12, seed: 7, restarts: 3 } as const;
    const a = await decomposeRun({ image, mask: p.truth.brainMask }, { ...opts, threads: 1 });
    const b = await decomposeRun({ image, mask: p.truth.brainMask }, { ...opts, threads: 2 });
    expect(Array.from(b.reproducibility!)).toEqual(Array.from(a.reproducibility!));
    expect(Buffer.from(b.maps.buffer).equals(Buffer.from(a.maps.buffer))).toBe(true);
    expect(b.restarts!.iterations).toEqual(a.restarts!.iterations);
  }, 120_000);

  it('automatic dimensionality is deterministic across threads too', async () => {
    const a = await decomposeRun({ image, mask: p.truth.brainMask }, { seed: 3, restarts: 2, threads: 1 });
    const b = await decomposeRun({ image, mask: p.truth.brainMask }, { seed: 3, restarts: 2, threads: 2 });
    expect(b.k).toBe(a.k);
    expect(b.iidSubsampling).toEqual(a.iidSubsampling);
    expect(Array.from(b.reproducibility!)).toEqual(Array.from(a.reproducibility!));
  }, 120_000);
});

describe('warnings', () => {
  const p = generatePhantom({ size: 'tiny', seed: 1 });
  const image = imageOf(p);

  it('non-convergence: one warm-started retry, then the result is kept and flagged', async () => {
    const r = await decomposeRun({ image, mask: p.truth.brainMask }, { components: 8, maxIter: 2, tol: 1e-12, restarts: 1, threads: 1 });
    expect(r.converged).toBe(false);
    expect(r.icaAttempts).toBe(2);
    expect(r.iterations).toBe(4);
    expect(r.seed).toBe(1);
    expect(r.warnings.map((w) => w.code)).toEqual(['ica_not_converged']);
    expect(r.warnings[0]!.message).toMatch(/did not converge within 2 iterations, nor in one retry/);
    const summary = decompositionSummary(r);
    expect(summary.converged).toBe(false);
    expect(summary.warnings).toEqual(r.warnings);
  });

  it('a dimension at the search bound min(⌊T/3⌋, 100) is a warning, never silent', async () => {
    const r = await decomposeRun({ image, mask: p.truth.brainMask }, { dimMethod: { variance: 0.999 }, restarts: 1, threads: 1 });
    expect(r.dimension.range).toEqual([2, Math.floor(80 / 3)]);
    expect(r.k).toBe(26);
    expect(r.dimension.atBound).toBe(true);
    expect(r.warnings[0]).toMatchObject({ code: 'dimension_at_bound' });
    expect(decompositionSummary(r)).toMatchObject({ dimensionBound: 26, dimensionAtBound: true });
  }, 60_000);
});
