import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { defaultSegmentLength, powerSpectrum, SpectrumError } from '@/lib/decomposition/spectrum';

interface WelchCase {
  name: string;
  trSeconds: number;
  segmentLength: number | null;
  npersegUsed: number;
  signal: number[];
  frequencies: number[];
  power: number[];
}

const fixture = JSON.parse(readFileSync(path.resolve(__dirname, '../fixtures/features/welch.json'), 'utf8')) as {
  library: string;
  cases: WelchCase[];
};

function expectRelClose(actual: ArrayLike<number>, expected: number[], rel: number, absFloor: number): void {
  expect(actual.length).toBe(expected.length);
  const scale = Math.max(...expected.map(Math.abs));
  for (let i = 0; i < expected.length; i++) {
    const tol = Math.max(rel * Math.abs(expected[i]), absFloor * scale);
    expect(Math.abs(actual[i] - expected[i]), `bin ${i}`).toBeLessThanOrEqual(tol);
  }
}

describe('powerSpectrum against scipy.signal.welch (fixture made with ' + fixture.library + ')', () => {
  for (const c of fixture.cases) {
    it(c.name, () => {
      const { frequencies, power } = powerSpectrum(Float64Array.from(c.signal), c.trSeconds, {
        segmentLength: c.segmentLength ?? undefined,
        layout: 'scipy',
      });
      if (c.segmentLength === null) expect(defaultSegmentLength(c.signal.length)).toBe(c.npersegUsed);
      // 1e-9 relative (brief); a floor of 1e-12 of the largest bin for bins that are ~0 in both.
      expectRelClose(frequencies, c.frequencies, 1e-9, 1e-12);
      expectRelClose(power, c.power, 1e-9, 1e-12);
    });
  }
  // The default 'cover' layout spreads segments so the last ends at the last volume; when
  // T − nperseg is a multiple of the step scipy's segments already do, and the two must agree.
  const aligned = fixture.cases.filter(
    (c: { signal: number[]; npersegUsed: number }) =>
      (c.signal.length - c.npersegUsed) % (c.npersegUsed - Math.floor(c.npersegUsed / 2)) === 0,
  );
  it(`default layout equals scipy when the segments already reach the end (${aligned.length} cases)`, () => {
    expect(aligned.length).toBeGreaterThanOrEqual(2);
    for (const c of aligned) {
      const { power } = powerSpectrum(Float64Array.from(c.signal), c.trSeconds, { segmentLength: c.segmentLength ?? undefined });
      expectRelClose(power, c.power, 1e-9, 1e-12);
    }
  });
});

describe('powerSpectrum covers every kept volume', () => {
  // The case: T = 156 volumes, TR 2 s, default nperseg 64 (step 32). scipy's layout ends
  // its last segment at volume 159 − 32 = 127, so volumes 128..155 never reach the spectrum.
  const T = 156;
  const tr = 2;
  const base = Float64Array.from({ length: T }, (_, i) => Math.sin(2 * Math.PI * 0.03 * i * tr));
  const spiked = Float64Array.from(base);
  spiked[150] += 20; // a spike planted in the last volumes
  const total = (p: Float64Array) => p.reduce((a, b) => a + b, 0);

  it("a spike at volume 150 of 156 raises the default spectrum (broadband) and not scipy's layout", () => {
    const clean = powerSpectrum(base, tr);
    const withSpike = powerSpectrum(spiked, tr);
    // A unit impulse of height h in one Hann-windowed segment adds ≈ h²·w² broadband power; the
    // high-frequency half of the spectrum, where the sinusoid has no power, must rise clearly.
    const hi = (p: Float64Array) => total(p.subarray(p.length >> 1));
    expect(hi(withSpike.power)).toBeGreaterThan(100 * hi(clean.power) + 1e-6);
    const scipyClean = powerSpectrum(base, tr, { layout: 'scipy' });
    const scipySpiked = powerSpectrum(spiked, tr, { layout: 'scipy' });
    expect(Array.from(scipySpiked.power)).toEqual(Array.from(scipyClean.power));
  });

  it("every volume lies in some segment: a spike at any volume (except the Hann window's zero at the very first sample) changes the spectrum", () => {
    const clean = powerSpectrum(base, tr);
    for (let v = 1; v < T; v++) {
      const x = Float64Array.from(base);
      x[v] += 5;
      const p = powerSpectrum(x, tr).power;
      expect(Math.abs(total(p) - total(clean.power)), `volume ${v}`).toBeGreaterThan(1e-6);
    }
  });
});

describe('powerSpectrum properties', () => {
  it('a sinusoid at a bin frequency peaks in that bin (TR 2 s, 0.0625 Hz)', () => {
    // Property of the DFT: a sinusoid with an integer number of cycles per segment puts its
    // power in bin k = f·nperseg·TR (common practice, no source).
    const tr = 2;
    const t = 256;
    const f0 = 0.0625; // with nperseg 64: k = 0.0625·64·2 = 8
    const x = new Float64Array(t);
    for (let i = 0; i < t; i++) x[i] = Math.sin(2 * Math.PI * f0 * i * tr);
    const { frequencies, power } = powerSpectrum(x, tr);
    expect(frequencies.length).toBe(33);
    let arg = 0;
    for (let k = 1; k < power.length; k++) if (power[k] > power[arg]) arg = k;
    expect(frequencies[arg]).toBeCloseTo(f0, 12);
    expect(frequencies[frequencies.length - 1]).toBeCloseTo(1 / (2 * tr), 12); // Nyquist = 1/(2·TR)
  });

  it('a 0.3 Hz sinusoid at TR 0.72 s peaks in the nearest bin', () => {
    const tr = 0.72;
    const x = new Float64Array(400);
    for (let i = 0; i < x.length; i++) x[i] = Math.cos(2 * Math.PI * 0.3 * i * tr + 0.4);
    const { frequencies, power } = powerSpectrum(x, tr);
    let arg = 0;
    for (let k = 1; k < power.length; k++) if (power[k] > power[arg]) arg = k;
    const df = frequencies[1] - frequencies[0];
    expect(Math.abs(frequencies[arg] - 0.3)).toBeLessThanOrEqual(df / 2 + 1e-12);
  });

  it('Parseval: Σ PSD·Δf equals the variance of a bin-aligned sinusoid exactly', () => {
    // Parseval's theorem with the density scaling 1/(fs·Σw²): for one Hann-windowed segment,
    // Σ PSD·Δf = Σ w²x² / Σ w², which is exactly ½ (the variance of a unit sine) when the sine
    // has k ≥ 2 whole cycles per segment (the w² harmonics stop at bin 2). Derived, no source.
    const tr = 1.5;
    const x = new Float64Array(128);
    for (let i = 0; i < x.length; i++) x[i] = Math.sin((2 * Math.PI * 5 * i) / 32);
    const { frequencies, power } = powerSpectrum(x, tr, { segmentLength: 32 });
    const df = frequencies[1] - frequencies[0];
    let integral = 0;
    for (const p of power) integral += p * df;
    expect(integral).toBeCloseTo(0.5, 12);
  });

  it('Parseval: Σ PSD·Δf ≈ variance for long white noise (statistical, 5 %)', () => {
    let seed = 12345;
    const rand = (): number => {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      return seed / 2147483648;
    };
    const x = new Float64Array(8192);
    for (let i = 0; i < x.length; i++) {
      // Box–Muller normal deviates
      x[i] = Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
    }
    let mean = 0;
    for (const v of x) mean += v;
    mean /= x.length;
    let variance = 0;
    for (const v of x) variance += (v - mean) ** 2;
    variance /= x.length;
    const { frequencies, power } = powerSpectrum(x, 2);
    const df = frequencies[1] - frequencies[0];
    let integral = 0;
    for (const p of power) integral += p * df;
    expect(Math.abs(integral / variance - 1)).toBeLessThan(0.05);
  });

  it('default segment length: smallest 2^k ≥ T/4, at least 32, at most T', () => {
    expect(defaultSegmentLength(200)).toBe(64);
    expect(defaultSegmentLength(1200)).toBe(512);
    expect(defaultSegmentLength(100)).toBe(32);
    expect(defaultSegmentLength(20)).toBe(20);
  });

  it('refuses a bad TR, too few points, a bad segment length and non-finite values', () => {
    const x = new Float64Array(50).fill(1);
    expect(() => powerSpectrum(x, 0)).toThrow(SpectrumError);
    expect(() => powerSpectrum(x, Number.NaN)).toThrow(/TR must be a positive/);
    expect(() => powerSpectrum(new Float64Array(1), 2)).toThrow(/at least 2 time points/);
    expect(() => powerSpectrum(x, 2, { segmentLength: 51 })).toThrow(/segmentLength/);
    const bad = new Float64Array(50);
    bad[7] = Number.NaN;
    expect(() => powerSpectrum(bad, 2)).toThrow(/volume 7/);
  });

  it('accepts a Float32Array time course', () => {
    const x = Float32Array.from({ length: 64 }, (_, i) => Math.sin(i));
    const a = powerSpectrum(x, 2);
    const b = powerSpectrum(Float64Array.from(x), 2);
    expect(Array.from(a.power)).toEqual(Array.from(b.power));
  });
});
