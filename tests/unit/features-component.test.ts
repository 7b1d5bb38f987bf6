import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  computeComponentFeatures,
  FeatureInputError,
  lag1Autocorrelation,
  mapMoments,
  maskEdge,
  spikeScore,
  stepScore,
  trendR2,
  type ComponentFeatures,
} from '@/lib/decomposition/features';
import { featureHints } from '@/lib/decomposition/feature-hints';
import { framewiseDisplacement, type MotionParams } from '@/lib/decomposition/motion';
import { powerSpectrum } from '@/lib/decomposition/spectrum';

type Dims = [number, number, number];
const idx = (d: Dims, x: number, y: number, z: number): number => x + d[0] * (y + d[1] * z);

const trend = JSON.parse(readFileSync(path.resolve(__dirname, '../fixtures/features/trend.json'), 'utf8')) as {
  library: string;
  cases: { name: string; values: number[]; trendR2: number; stepScore: number }[];
};

const moments = JSON.parse(readFileSync(path.resolve(__dirname, '../fixtures/features/moments.json'), 'utf8')) as {
  library: string;
  cases: { name: string; values: number[]; skewness: number; kurtosis: number }[];
};

/** Deterministic normal deviates (LCG + Box–Muller). */
function normalRng(seed: number): () => number {
  let s = seed;
  const u = (): number => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return (s + 0.5) / 2147483648;
  };
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}

// A 20×20×12 grid with an ellipsoidal mask.
const dims: Dims = [20, 20, 12];
const nVox = dims[0] * dims[1] * dims[2];
const inMask = new Uint8Array(nVox);
const indices: number[] = [];
for (let z = 0; z < dims[2]; z++)
  for (let y = 0; y < dims[1]; y++)
    for (let x = 0; x < dims[0]; x++) {
      if (((x - 9.5) / 9) ** 2 + ((y - 9.5) / 9) ** 2 + ((z - 5.5) / 5.5) ** 2 <= 1) {
        inMask[idx(dims, x, y, z)] = 1;
        indices.push(idx(dims, x, y, z));
      }
    }
const maskIndices = Int32Array.from(indices);
const V = maskIndices.length;
const edge = maskEdge(inMask, dims, 1);

const T = 300;
const TR = 1;
function sine(freqHz: number, tr: number, t = T): Float64Array {
  return Float64Array.from({ length: t }, (_, i) => Math.sin(2 * Math.PI * freqHz * i * tr + 0.3));
}
function noiseMap(seed: number, sd = 0.5): Float32Array {
  const r = normalRng(seed);
  return Float32Array.from({ length: V }, () => sd * r());
}
function features(map: Float32Array, tc: Float64Array, motion?: MotionParams, tr = TR): ComponentFeatures {
  return computeComponentFeatures({ map, maskIndices, dims, timecourse: tc, trSeconds: tr, motion, spectrum: powerSpectrum(tc, tr) });
}

describe('map moments against scipy.stats (fixture made with ' + moments.library + ')', () => {
  for (const c of moments.cases) {
    it(`${c.name}: skew(bias=True), kurtosis(fisher=True, bias=True) to 1e-9 relative`, () => {
      const m = mapMoments(Float32Array.from(c.values));
      expect(Math.abs(m.skewness - c.skewness)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(c.skewness)));
      expect(Math.abs(m.kurtosis - c.kurtosis)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(c.kurtosis)));
      expect(m.peakAbs).toBe(Math.max(...c.values.map(Math.abs)));
    });
  }
  it('constant map gives 0 (our convention; scipy 1.10 returns 0 skew and −3 kurtosis)', () => {
    expect(mapMoments(new Float32Array(10).fill(2))).toEqual({ skewness: 0, kurtosis: 0, peakAbs: 2 });
  });
});

describe('spatial features', () => {
  it('a map on the mask rim has edgeFraction 1; an interior blob has 0', () => {
    // Bulk uniform in ±0.3: its robust SD is 1.4826·0.15, so |z| ≤ 0.3 is at most 1.35 robust SDs
    // and never passes the 2.5 cut; rim voxels get 4, blob voxels 5.
    const uniform = () => {
      const r = normalRng(1);
      return Float32Array.from({ length: V }, () => 0.3 * (2 * ((Math.abs(r()) * 1e4) % 1) - 1));
    };
    const rim = uniform();
    const blob = uniform();
    let nRim = 0;
    let nBlob = 0;
    for (let i = 0; i < V; i++) {
      const j = maskIndices[i];
      if (edge[j]) {
        rim[i] = 4;
        nRim++;
      }
      const x = j % dims[0];
      const y = Math.floor(j / dims[0]) % dims[1];
      const z = Math.floor(j / (dims[0] * dims[1]));
      if ((x - 9) ** 2 + (y - 9) ** 2 + (z - 5) ** 2 <= 4) {
        blob[i] = 5;
        nBlob++;
      }
    }
    const fRim = features(rim, sine(0.02, TR));
    expect(fRim.edgeFraction).toBe(1);
    const fBlob = features(blob, sine(0.02, TR));
    expect(fBlob.edgeFraction).toBe(0);
    expect(fBlob.clusterCount).toBe(1);
    expect(fBlob.largestClusterVoxels).toBe(nBlob);
    expect(fBlob.largestClusterFraction).toBe(1);
    expect(fBlob.peakZ).toBe(5);
    expect(nRim).toBeGreaterThan(100);
  });

  it('widening the edge to 2 voxels catches a ring one voxel inside the rim', () => {
    const edge2 = maskEdge(inMask, dims, 2);
    const map = new Float32Array(V);
    for (let i = 0; i < V; i++) if (edge2[maskIndices[i]] && !edge[maskIndices[i]]) map[i] = 3;
    const base = { map, maskIndices, dims, timecourse: sine(0.02, TR), trSeconds: TR };
    const spectrum = powerSpectrum(base.timecourse, TR);
    expect(computeComponentFeatures({ ...base, spectrum }).edgeFraction).toBe(0);
    expect(computeComponentFeatures({ ...base, spectrum, edgeDepth: 2 }).edgeFraction).toBe(1);
  });

  it('counts 26-connected clusters of at least 10 voxels, and the fraction of the largest', () => {
    const map = new Float32Array(V);
    const pos = new Map<number, number>();
    maskIndices.forEach((j, i) => pos.set(j, i));
    const set = (x: number, y: number, z: number, v = 3): void => {
      const i = pos.get(idx(dims, x, y, z));
      if (i === undefined) throw new Error('test voxel outside mask');
      map[i] = v;
    };
    // cluster A: 3×3×2 = 18 voxels; cluster B: a diagonal (corner-contact) chain of 10 voxels;
    // 3 isolated single voxels (below the 10-voxel minimum). Negative z counts too (|z|).
    for (let x = 4; x < 7; x++) for (let y = 8; y < 11; y++) for (const z of [5, 6]) set(x, y, z);
    for (let k = 0; k < 10; k++) set(10 + (k % 2), 5 + k, 3 + (k % 2), -3);
    set(14, 14, 5);
    set(9, 16, 7);
    set(15, 8, 8);
    const f = features(map, sine(0.02, TR));
    expect(f.clusterCount).toBe(2);
    expect(f.largestClusterVoxels).toBe(18);
    expect(f.largestClusterFraction).toBeCloseTo(18 / 31, 12);
    // the cut is adjustable: far above every voxel nothing is supra-threshold, and the spatial
    // features are then undefined (null), not 0
    const g = computeComponentFeatures({
      map,
      maskIndices,
      dims,
      timecourse: sine(0.02, TR),
      trSeconds: TR,
      spectrum: powerSpectrum(sine(0.02, TR), TR),
      robustZCut: 1e6,
    });
    for (const key of ['clusterCount', 'edgeFraction', 'largestClusterVoxels', 'largestClusterFraction', 'mapThresholdZ'] as const)
      expect(g[key], key).toBeNull();
  });

  it('undefined spatial features are null, never 0: a broad map with no voxels standing out (a drift-like gradient)', () => {
    // The drift component: loaded over the whole brain, peak |z| 2.23, so a fixed 2.3 cut
    // found no voxel and reported 0 % edge, 0 clusters. A linear gradient across x, z-scored, has
    // the same shape: its robust SD is wide, no voxel is 2.5 robust SDs out.
    const ramp = Float32Array.from(maskIndices, (j) => (j % dims[0]) - 9.5);
    let m = 0,
      q = 0;
    for (const v of ramp) {
      m += v;
      q += v * v;
    }
    m /= V;
    const sd = Math.sqrt(q / V - m * m);
    const z = ramp.map((v) => (v - m) / sd);
    expect(Math.max(...Array.from(z, Math.abs))).toBeLessThan(2.3);
    const f = features(z, sine(0.02, TR));
    expect(f.edgeFraction).toBeNull();
    expect(f.clusterCount).toBeNull();
    expect(f.largestClusterVoxels).toBeNull();
    expect(f.largestClusterFraction).toBeNull();
    expect(f.mapThresholdZ).toBeNull();
    expect(f.peakZ).toBeGreaterThan(1); // the defined features stay numbers
    // a constant map has no spread at all
    expect(features(new Float32Array(V).fill(1), sine(0.02, TR)).clusterCount).toBeNull();
    // and the desk shows a dash for each of them
    for (const key of ['edgeFraction', 'clusterCount', 'largestClusterVoxels', 'largestClusterFraction', 'mapThresholdZ'] as const) {
      expect(featureHints[key].format(f[key])).toBe('—');
    }
  });

  it('the threshold adapts to the map: a focal blob on Gaussian noise is found, and the cut is reported in z', () => {
    const map = noiseMap(4, 1);
    const pos = new Map<number, number>();
    maskIndices.forEach((j, i) => pos.set(j, i));
    let nBlob = 0;
    for (let i = 0; i < V; i++) {
      const j = maskIndices[i]!;
      const x = j % dims[0],
        y = Math.floor(j / dims[0]) % dims[1],
        z = Math.floor(j / (dims[0] * dims[1]));
      if ((x - 9) ** 2 + (y - 9) ** 2 + (z - 5) ** 2 <= 4) {
        map[i] = 8;
        nBlob++;
      }
    }
    const f = features(map, sine(0.02, TR));
    // robust SD of the N(0,1) bulk ≈ 1, so the cut sits near 2.5 (sampling error of the MAD, ±0.2)
    expect(f.mapThresholdZ).toBeGreaterThan(2.2);
    expect(f.mapThresholdZ).toBeLessThan(2.8);
    expect(f.largestClusterVoxels).toBeGreaterThanOrEqual(nBlob);
  });
});

describe('drift and step features', () => {
  for (const c of trend.cases) {
    it(`${c.name}: trendR2 equals numpy.polyfit(t, x, 2) R² and stepScore a brute-force scan (fixture: ${trend.library})`, () => {
      expect(trendR2(c.values)).toBeCloseTo(c.trendR2, 10);
      expect(stepScore(c.values)).toBeCloseTo(c.stepScore, 10);
    });
  }

  it('hand-computed step: [0,1,0,1,0, 3,4,3,4,3] splits only at 5: shift 3, pooled SD √(2.4/8) → 5.477', () => {
    expect(stepScore([0, 1, 0, 1, 0, 3, 4, 3, 4, 3])).toBeCloseTo(3 / Math.sqrt(0.3), 12);
    expect(stepScore([1, 2, 3])).toBeNull(); // too short to split with 5 volumes a side
    expect(trendR2([1, 2, 3, 4])).toBeCloseTo(1, 12); // a line is all trend
    expect(trendR2([3, 3, 3, 3])).toBeNull();
  });

  it('the step series is picked out by stepScore and the drifts by trendR2 (synthetic series of the fixture)', () => {
    const by = Object.fromEntries(trend.cases.map((c) => [c.name, c.values]));
    const steps = trend.cases.map((c) => ({ name: c.name, step: stepScore(c.values)!, trend: trendR2(c.values)! }));
    const topStep = steps.reduce((a, b) => (b.step > a.step ? b : a));
    expect(topStep.name).toBe('step at volume 60 plus noise');
    // white noise and a network-like slow sinusoid carry almost no trend; drifts carry much
    for (const name of ['white noise', '0.05 Hz sinusoid at TR 2 s']) expect(trendR2(by[name]!)!).toBeLessThan(0.05);
    for (const name of ['linear trend plus noise', 'quadratic drift plus noise']) expect(trendR2(by[name]!)!).toBeGreaterThan(0.4);
    expect(featureHints.stepScore.format(stepScore(by['step at volume 60 plus noise']!))).toMatch(/^\d+\.\d$/);
  });
});

describe('temporal features', () => {
  const map = noiseMap(3);
  it('0.3 Hz sinusoid → highFrequencyPower near 1; 0.02 Hz → near 0 (band edge 0.1 Hz, Cordes et al. 2001, AJNR 22:1326)', () => {
    expect(features(map, sine(0.3, TR)).highFrequencyPower).toBeGreaterThan(0.99);
    expect(features(map, sine(0.02, 2)).highFrequencyPower).toBeLessThan(0.01);
  });

  it('spike score: hand-computed robust z of the largest first difference', () => {
    // d = [1,2,1,3,1,2,20]: median 2, |d − 2| = [1,0,1,1,1,0,18], MAD 1 → 18 / 1.4826
    expect(spikeScore([0, 1, 3, 4, 7, 8, 10, 30])).toBeCloseTo(18 / 1.4826, 12);
    // MAD 0 falls back to mean absolute deviation × √(π/2): d = [1,1,1,1,10,1,1] → 9 / ((9/7)·√(π/2))
    expect(spikeScore([0, 1, 2, 3, 4, 14, 15, 16])).toBeCloseTo(7 / Math.sqrt(Math.PI / 2), 12);
    expect(spikeScore([2, 2, 2, 2])).toBe(0);
    const r = normalRng(9);
    const noisy = Float64Array.from({ length: T }, () => r());
    const quiet = features(map, noisy).spikeScore;
    noisy[150] += 25;
    expect(features(map, noisy).spikeScore).toBeGreaterThan(3 * quiet);
  });

  it('lag-1 autocorrelation: hand-computed [1,2,3,4] → 1.25/5 = 0.25; slow sine near 1', () => {
    expect(lag1Autocorrelation([1, 2, 3, 4])).toBeCloseTo(0.25, 15);
    expect(features(map, sine(0.02, TR)).temporalAutocorrelation).toBeGreaterThan(0.99);
  });
});

describe('motion features', () => {
  const r = normalRng(11);
  const walk = (): Float64Array => {
    const a = new Float64Array(T);
    for (let i = 1; i < T; i++) a[i] = a[i - 1] + 0.05 * r();
    return a;
  };
  const motion: MotionParams = {
    translations: [walk(), walk(), walk()],
    rotations: [walk(), walk(), walk()].map((c) => c.map((v) => v / 50)),
  };
  const map = noiseMap(5);

  it('a time course equal to a motion column → motionCorrelation ≈ 1', () => {
    expect(features(map, Float64Array.from(motion.translations[1]), motion).motionCorrelation).toBeCloseTo(1, 12);
    expect(
      features(
        map,
        Float64Array.from(motion.rotations[2]).map((v) => -3 * v),
        motion,
      ).motionCorrelation,
    ).toBeCloseTo(1, 12);
  });

  it('a time course equal to a parameter derivative → motionCorrelation ≈ 1', () => {
    const d = new Float64Array(T);
    for (let i = 1; i < T; i++) d[i] = motion.rotations[0][i] - motion.rotations[0][i - 1];
    expect(features(map, d, motion).motionCorrelation).toBeCloseTo(1, 12);
  });

  it('FD correlation and mean FD (over volumes 1..T−1)', () => {
    const fd = framewiseDisplacement(motion);
    const f = features(map, fd, motion);
    expect(f.fdCorrelation).toBeCloseTo(1, 12);
    let s = 0;
    for (let i = 1; i < T; i++) s += fd[i];
    expect(f.meanFramewiseDisplacement).toBeCloseTo(s / (T - 1), 12);
    const slow = features(map, sine(0.3, TR), motion);
    expect(slow.motionCorrelation).toBeLessThan(0.5);
  });

  it('motion features are null without motion', () => {
    const f = features(map, sine(0.02, TR));
    expect(f.motionCorrelation).toBeNull();
    expect(f.fdCorrelation).toBeNull();
    expect(f.meanFramewiseDisplacement).toBeNull();
  });

  it('refuses motion of another length and a map of another size', () => {
    expect(() => features(map, sine(0.02, TR, T - 1), motion)).toThrow(/drop the same initial volumes/);
    expect(() =>
      computeComponentFeatures({
        map: new Float32Array(3),
        maskIndices,
        dims,
        timecourse: sine(0.02, TR),
        trSeconds: TR,
        spectrum: powerSpectrum(sine(0.02, TR), TR),
      }),
    ).toThrow(FeatureInputError);
  });
});

describe('featureHints', () => {
  it('covers exactly the feature keys, with label, hint and a null-safe formatter', () => {
    const f = features(noiseMap(2), sine(0.02, TR));
    expect(Object.keys(featureHints).sort()).toEqual(Object.keys(f).sort());
    for (const [key, h] of Object.entries(featureHints)) {
      expect(h.label.length, key).toBeGreaterThan(0);
      expect(h.hint.endsWith('.'), key).toBe(true);
      expect(h.format(null)).toBe('—');
      expect(h.format(0.25)).not.toBe('—');
    }
    expect(featureHints.highFrequencyPower.format(0.823)).toBe('82 %');
    expect(featureHints.meanFramewiseDisplacement.format(0.1234)).toBe('0.12 mm');
  });
});
