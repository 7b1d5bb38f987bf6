// The realistic phantom model: sources a rater must recognise, and noise that is spatially smooth and
// temporally autocorrelated as in real runs (REAL-DATA.md in the project notes: FWHM 1.5–3 voxels,
// lag-1 autocorrelation 0.2–0.5 at TR 2 s; common practice, no source).
import { describe, expect, it } from 'vitest';
import { generatePhantom, headModel, truthSummary, NOISE_AR1, REALISTIC_NOISE_FRACTION } from '@/lib/phantom';

describe('realistic phantom (small grid, 120 volumes)', () => {
  const p = generatePhantom({ size: 'small', seed: 4, model: 'realistic' });
  const [nx, ny, nz, nt] = p.dims;
  const nv = nx * ny * nz;
  const head = headModel('small');

  it('holds ≥ 25 sources of every kind the issue lists, with labels saved in the truth summary', () => {
    const s = p.truth.sources;
    expect(s.length).toBeGreaterThanOrEqual(25);
    expect(s.filter((x) => x.pattern === 'network').length).toBeGreaterThanOrEqual(10);
    for (const pattern of ['rim', 'drift', 'step', 'spike', 'slice', 'pulsation', 'vascular', 'susceptibility']) {
      expect(
        s.some((x) => x.pattern === pattern),
        pattern,
      ).toBe(true);
    }
    const spikes = s.find((x) => x.pattern === 'spike')!;
    const last = Array.from(spikes.timecourse.slice(nt - 6)).some((v) => v !== 0);
    expect(last, 'a spike in the last volumes').toBe(true);
    const summary = truthSummary(p);
    expect(summary.phantomModel).toBe('realistic');
    expect(summary.sources.every((x) => typeof x.pattern === 'string')).toBe(true);
    expect(p.model).toBe('realistic');
    expect(generatePhantom({ size: 'small', seed: 4, volumes: 20 }).model).toBe('classic');
  });

  it('noise is smooth in space (lag-1 ρ ≈ exp(−1/4) for a Gaussian of SD 1 voxel) and AR(1) in time (ρ in 0.2–0.45)', () => {
    // Noise = data − baseline·(1 + Σ map·timecourse), exactly, inside the brain (data stay positive there).
    const noise = new Float64Array(nv * nt);
    for (let t = 0; t < nt; t++) {
      for (let i = 0; i < nv; i++) {
        if (!p.truth.brainMask[i]) continue;
        let m = 1;
        for (const s of p.truth.sources) if (s.map[i]) m += s.map[i]! * s.timecourse[t]!;
        noise[t * nv + i] = p.data[t * nv + i]! - head.baseline[i]! * m;
      }
    }
    let ss = 0,
      n = 0,
      lagT = 0,
      lagX = 0,
      nX = 0;
    for (let t = 0; t < nt; t++) {
      for (let i = 0; i < nv; i++) {
        if (!p.truth.brainMask[i]) continue;
        const v = noise[t * nv + i]!;
        ss += v * v;
        n++;
        if (t > 0) lagT += v * noise[(t - 1) * nv + i]!;
        if (i % nx < nx - 1 && p.truth.brainMask[i + 1]) {
          lagX += v * noise[t * nv + i + 1]!;
          nX++;
        }
      }
    }
    const variance = ss / n;
    expect(Math.sqrt(variance) / 820).toBeCloseTo(REALISTIC_NOISE_FRACTION, 3);
    const rhoT = lagT / ((n * (nt - 1)) / nt) / variance;
    expect(rhoT).toBeGreaterThan(NOISE_AR1[0] - 0.03);
    expect(rhoT).toBeLessThan(NOISE_AR1[1] + 0.03);
    expect(lagX / nX / variance).toBeCloseTo(Math.exp(-1 / 4), 1);
  });
});
