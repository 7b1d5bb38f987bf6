import { describe, expect, it } from 'vitest';
import { encodeNifti1 } from '@/lib/nifti';
import { generatePhantom, normalQuantileTable, phantomToNiftiInput, truthMapsToNiftiInput } from '@/lib/phantom';

/** Fraction of a series' power (mean removed) above fCut Hz, by a plain DFT over bins 1..⌊n/2⌋. */
function powerAbove(x: Float64Array, trSeconds: number, fCut: number): number {
  const n = x.length;
  const mean = x.reduce((a, b) => a + b, 0) / n;
  let above = 0;
  let total = 0;
  for (let k = 1; k <= Math.floor(n / 2); k++) {
    let re = 0;
    let im = 0;
    for (let t = 0; t < n; t++) {
      const a = (-2 * Math.PI * k * t) / n;
      re += (x[t] - mean) * Math.cos(a);
      im += (x[t] - mean) * Math.sin(a);
    }
    const p = re * re + im * im;
    total += p;
    if (k / (n * trSeconds) > fCut) above += p;
  }
  return above / total;
}

function corr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const n = a.length;
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i];
    mb += b[i];
  }
  ma /= n;
  mb /= n;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    sab += (a[i] - ma) * (b[i] - mb);
    saa += (a[i] - ma) ** 2;
    sbb += (b[i] - mb) ** 2;
  }
  return sab / Math.sqrt(saa * sbb);
}

describe('generatePhantom (tiny)', () => {
  const p = generatePhantom({ size: 'tiny', seed: 1 });
  const [nx, ny, nz, nt] = p.dims;
  const nv = nx * ny * nz;

  it('has the tiny grid, TR 2 s, and data in file order of the right length', () => {
    expect(p.dims).toEqual([20, 24, 16, 80]);
    expect(p.trSeconds).toBe(2);
    expect(p.data.length).toBe(nv * nt);
    expect(p.truth.brainMask.length).toBe(nv);
    expect(p.motion.translations).toHaveLength(3);
    expect(p.motion.rotations).toHaveLength(3);
    for (const a of [...p.motion.translations, ...p.motion.rotations]) expect(a.length).toBe(nt);
  });

  it('is deterministic under a seed, and different seeds differ', () => {
    const again = generatePhantom({ size: 'tiny', seed: 1 });
    expect(Buffer.from(again.data.buffer).equals(Buffer.from(p.data.buffer))).toBe(true);
    const other = generatePhantom({ size: 'tiny', seed: 2 });
    let diff = 0;
    for (let i = 0; i < p.data.length; i++) if (other.data[i] !== p.data[i]) diff++;
    expect(diff).toBeGreaterThan(p.data.length * 0.5);
  });

  it('has finite, positive, BOLD-like values in the brain', () => {
    let min = Infinity;
    let max = -Infinity;
    let sum = 0;
    let n = 0;
    let nonFinite = 0;
    for (let t = 0; t < nt; t++) {
      for (let i = 0; i < nv; i++) {
        const v = p.data[t * nv + i];
        if (!Number.isFinite(v) || v < 0) nonFinite++;
        if (!p.truth.brainMask[i]) continue;
        min = Math.min(min, v);
        max = Math.max(max, v);
        sum += v;
        n++;
      }
    }
    expect(nonFinite).toBe(0);
    expect(min).toBeGreaterThan(100);
    expect(max).toBeLessThan(2000);
    expect(sum / n).toBeGreaterThan(500);
    expect(sum / n).toBeLessThan(1100);
  });

  it('labels every source and keeps their maps sparse and non-empty', () => {
    const kinds = p.truth.sources.map((s) => s.noiseKind ?? s.kind);
    for (const k of ['signal', 'motion', 'pulsation', 'vascular', 'white-matter', 'scanner']) expect(kinds).toContain(k);
    expect(p.truth.sources.filter((s) => s.kind === 'signal').length).toBeGreaterThanOrEqual(4);
    for (const s of p.truth.sources) {
      expect(s.map.length).toBe(nv);
      expect(s.timecourse.length).toBe(nt);
      let nz = 0;
      let peak = 0;
      for (let i = 0; i < nv; i++) {
        if (s.map[i] !== 0) nz++;
        peak = Math.max(peak, Math.abs(s.map[i]));
      }
      expect(peak, s.name).toBeCloseTo(1, 6);
      expect(nz, s.name).toBeGreaterThan(10);
      expect(nz, s.name).toBeLessThan(p.truth.brainMask.reduce((a, b) => a + b, 0));
      if (s.kind === 'noise') expect(s.noiseKind, s.name).toBeDefined();
    }
  });

  it('gives signal sources power mostly below 0.1 Hz and pulsation power above (BOLD band: Cordes et al. 2001)', () => {
    for (const s of p.truth.sources) {
      const above = powerAbove(s.timecourse, p.trSeconds, 0.1);
      if (s.kind === 'signal') expect(above, s.name).toBeLessThan(0.1);
      if (s.noiseKind === 'pulsation') expect(above, s.name).toBeGreaterThan(0.9);
      if (s.noiseKind === 'white-matter') expect(above, s.name).toBeLessThan(0.1);
    }
  });

  it('gives sources distinct time courses', () => {
    const src = p.truth.sources;
    for (let a = 0; a < src.length; a++)
      for (let b = a + 1; b < src.length; b++) {
        expect(Math.abs(corr(src[a].timecourse, src[b].timecourse)), `${src[a].name} / ${src[b].name}`).toBeLessThan(0.9);
      }
  });

  it('drives the rim source from the simulated motion; motionScale 0 removes it', () => {
    const rim = p.truth.sources.find((s) => s.noiseKind === 'motion')!;
    let sd = 0;
    for (const v of rim.timecourse) sd += v * v;
    expect(Math.sqrt(sd / nt)).toBeGreaterThan(0.01);
    const still = generatePhantom({ size: 'tiny', seed: 1, motionScale: 0 });
    expect(still.truth.sources.find((s) => s.noiseKind === 'motion')!.timecourse.every((v) => v === 0)).toBe(true);
    expect(still.motion.translations[0].every((v) => v === 0)).toBe(true);
  });

  it('shows each source in the data: the voxel at a map peak follows its time course', () => {
    for (const s of p.truth.sources) {
      let best = 0;
      for (let i = 0; i < nv; i++) if (Math.abs(s.map[i]) > Math.abs(s.map[best])) best = i;
      const series = new Float64Array(nt);
      for (let t = 0; t < nt; t++) series[t] = p.data[t * nv + best];
      // Other sources overlap some peaks, so ask only for a clear positive relation.
      expect(corr(series, s.timecourse), s.name).toBeGreaterThan(0.3);
    }
  });

  it('honours volumes and gives writer input for data and truth maps', () => {
    const short = generatePhantom({ size: 'tiny', seed: 3, volumes: 20 });
    expect(short.dims[3]).toBe(20);
    const input = phantomToNiftiInput(short);
    expect(input.dims).toEqual([20, 24, 16, 20]);
    expect(input.pixdim).toEqual([8, 8, 9, 2]);
    expect(input.data).toBe(short.data);
    expect(encodeNifti1(input).length).toBe(352 + 4 * short.data.length);
    const i16 = phantomToNiftiInput(short, { datatype: 'int16' });
    expect(i16.data).toBeInstanceOf(Int16Array);
    expect(i16.sclSlope).toBe(1);
    expect(Math.abs((i16.data as Int16Array)[5000] - short.data[5000])).toBeLessThanOrEqual(0.5);
    const maps = truthMapsToNiftiInput(short);
    expect(maps.dims).toEqual([20, 24, 16, short.truth.sources.length]);
  });
});

describe('normal quantile table (thermal-noise sampler)', () => {
  it('has mean 0 and SD 1 within 0.2 % (property of N(0, 1))', () => {
    const t = normalQuantileTable();
    let m = 0;
    for (const v of t) m += v;
    m /= t.length;
    let v2 = 0;
    for (const v of t) v2 += (v - m) ** 2;
    expect(Math.abs(m)).toBeLessThan(1e-6);
    expect(Math.abs(Math.sqrt(v2 / t.length) - 1)).toBeLessThan(0.002);
  });
});
