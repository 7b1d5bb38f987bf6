/**
 * Component regression (REFERENCES.md "component regression": least squares; full = regress the
 * noise time courses alone, partial = fit all, subtract the noise part). Constructed data
 * Y = 2S + 3N: partial leaves 2S exactly (to float precision). Phantom (lib/phantom, tiny): a
 * removed noise source no longer correlates with the residual; signal sources keep their variance.
 */
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { buildDesign, regressVoxelMajor, VolumeRegression, RegressionError } from '@/lib/denoise/regress';
import { denoiseImage } from '@/lib/denoise/denoise-image';
import { generatePhantom, phantomToNiftiInput } from '@/lib/phantom';
import { decodeNifti, encodeNifti1, readNiftiFile } from '@/lib/nifti';

const dir = await mkdtemp(path.join(os.tmpdir(), 'quorum-denoise-'));
afterAll(() => rm(dir, { recursive: true, force: true }));

function corr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const n = a.length;
  let ma = 0,
    mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i]!;
    mb += b[i]!;
  }
  ma /= n;
  mb /= n;
  let sab = 0,
    saa = 0,
    sbb = 0;
  for (let i = 0; i < n; i++) {
    const x = a[i]! - ma,
      y = b[i]! - mb;
    sab += x * y;
    saa += x * x;
    sbb += y * y;
  }
  return sab / Math.sqrt(saa * sbb || 1);
}
const variance = (a: ArrayLike<number>) => {
  let m = 0;
  for (let i = 0; i < a.length; i++) m += a[i]!;
  m /= a.length;
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i]! - m) ** 2;
  return s / a.length;
};

/** T = 60, two components: s (slow sine) and n (fast, correlated with s on purpose: 0.4·s + …). */
function constructed() {
  const T = 60,
    V = 7;
  const s = new Float64Array(T),
    n = new Float64Array(T);
  for (let t = 0; t < T; t++) {
    s[t] = Math.sin((2 * Math.PI * t) / 30);
    n[t] = 0.4 * s[t] + Math.cos((2 * Math.PI * t) / 5) + 0.3 * Math.sin(t * 1.7);
  }
  // zero-mean courses, so "exactly 2S" holds without a constant (the voxel mean is kept)
  const ms = s.reduce((a, c) => a + c, 0) / T,
    mn = n.reduce((a, c) => a + c, 0) / T;
  for (let t = 0; t < T; t++) {
    s[t] -= ms;
    n[t] -= mn;
  }
  const tcs = new Float64Array(T * 2);
  for (let t = 0; t < T; t++) {
    tcs[t * 2] = s[t];
    tcs[t * 2 + 1] = n[t];
  }
  const a = [1, 0.5, -2, 3, 0.1, 1.5, -0.7],
    b = [2, -1, 0.3, 1, 4, 0, -2.5];
  const Y = new Float64Array(V * T),
    S2 = new Float64Array(V * T);
  for (let v = 0; v < V; v++)
    for (let t = 0; t < T; t++) {
      S2[v * T + t] = 2 * a[v]! * s[t]!;
      Y[v * T + t] = 2 * a[v]! * s[t]! + 3 * b[v]! * n[t]!;
    }
  return { T, V, s, n, tcs, Y, S2 };
}

describe('constructed Y = 2S + 3N (REFERENCES.md component regression)', () => {
  it('partial regression leaves 2S exactly, to float precision', () => {
    const { T, V, tcs, Y, S2 } = constructed();
    const out = regressVoxelMajor(Y, V, buildDesign({ timecourses: tcs, T, k: 2, noise: [2], mode: 'partial' }));
    for (let i = 0; i < V * T; i++) expect(Math.abs(out[i]! - S2[i]!)).toBeLessThan(1e-5 * Math.max(1, Math.abs(S2[i]!)));
  });

  it('full regression of the correlated noise course alone also removes the part of S it shares (why partial is the default)', () => {
    const { T, V, s, tcs, Y, S2 } = constructed();
    const out = regressVoxelMajor(Y, V, buildDesign({ timecourses: tcs, T, k: 2, noise: [2], mode: 'full' }));
    let maxDiff = 0;
    for (let i = 0; i < V * T; i++) maxDiff = Math.max(maxDiff, Math.abs(out[i]! - S2[i]!));
    expect(maxDiff).toBeGreaterThan(0.1);
    // the residual is orthogonal to the noise course (least squares)
    const { n } = constructed();
    for (let v = 0; v < V; v++) expect(Math.abs(corr(out.subarray(v * T, (v + 1) * T), n))).toBeLessThan(1e-5);
    expect(s.length).toBe(T);
  });

  it('the volume-by-volume form equals the voxel-major form', () => {
    const { T, V, tcs, Y } = constructed();
    const design = buildDesign({ timecourses: tcs, T, k: 2, noise: [2], mode: 'partial' });
    const expected = regressVoxelMajor(Y, V, design);
    const reg = new VolumeRegression(design, V);
    const vol = new Float32Array(V),
      out = new Float32Array(V);
    for (let t = 0; t < T; t++) {
      for (let v = 0; v < V; v++) vol[v] = Y[v * T + t]!;
      reg.accumulate(t, vol);
    }
    for (let t = 0; t < T; t++) {
      for (let v = 0; v < V; v++) vol[v] = Y[v * T + t]!;
      reg.apply(t, vol, out);
      for (let v = 0; v < V; v++) expect(out[v]).toBeCloseTo(expected[v * T + t]!, 4);
    }
  });

  it('keeps each voxel mean (the intercept is fitted, never removed)', () => {
    const { T, V, tcs, Y } = constructed();
    const shifted = Y.map((y) => y + 100);
    const out = regressVoxelMajor(shifted, V, buildDesign({ timecourses: tcs, T, k: 2, noise: [1, 2], mode: 'partial' }));
    for (let v = 0; v < V; v++) {
      let m = 0;
      for (let t = 0; t < T; t++) m += out[v * T + t]!;
      expect(m / T).toBeCloseTo(100 + Y.subarray(v * T, (v + 1) * T).reduce((a, b) => a + b, 0) / T, 3);
    }
  });

  it('refuses a component number outside 1..k and more regressors than time points', () => {
    const { T, tcs } = constructed();
    expect(() => buildDesign({ timecourses: tcs, T, k: 2, noise: [3], mode: 'partial' })).toThrow(RegressionError);
    expect(() => buildDesign({ timecourses: new Float64Array(4), T: 2, k: 2, noise: [1], mode: 'partial' })).toThrow(/cannot be fitted/);
  });
});

describe('phantom (tiny, seed 1): regression with the true source time courses', () => {
  it('a removed noise source no longer correlates with the residual; signal sources keep their variance', async () => {
    const p = generatePhantom({ size: 'tiny', seed: 1 });
    const [nx, ny, nz, nt] = p.dims;
    const N = nx * ny * nz;
    const sources = p.truth.sources;
    const k = sources.length;
    const tcs = new Float64Array(nt * k);
    for (let t = 0; t < nt; t++) for (let c = 0; c < k; c++) tcs[t * k + c] = sources[c]!.timecourse[t]!;
    const noise = sources.map((s, i) => (s.kind === 'noise' ? i + 1 : 0)).filter(Boolean);
    expect(noise.length).toBeGreaterThan(0);
    const image = decodeNifti(encodeNifti1(phantomToNiftiInput(p)));
    const outPath = path.join(dir, 'phantom_denoised.nii.gz');
    const res = await denoiseImage({ image, drop: 0, timecourses: tcs, k, noise, mode: 'partial', mask: p.truth.brainMask, outPath });
    expect(res.volumes).toBe(nt);
    const out = await readNiftiFile(outPath);
    const fullPath = path.join(dir, 'phantom_full.nii.gz');
    await denoiseImage({ image, drop: 0, timecourses: tcs, k, noise, mode: 'full', mask: p.truth.brainMask, outPath: fullPath });
    const outFull = await readNiftiFile(fullPath);
    expect([out.nx, out.ny, out.nz, out.nt]).toEqual([nx, ny, nz, nt]);

    const series = (img: typeof out, voxel: number) => {
      const s = new Float64Array(nt);
      const v = new Float32Array(N);
      for (let t = 0; t < nt; t++) {
        img.readVolume(t, v);
        s[t] = v[voxel]!;
      }
      return s;
    };
    const peak = (map: Float32Array) => {
      let best = 0;
      for (let i = 0; i < map.length; i++) if (p.truth.brainMask[i] && Math.abs(map[i]!) > Math.abs(map[best]!)) best = i;
      return best;
    };
    for (const [i, src] of sources.entries()) {
      const v = peak(src.map);
      if (!p.truth.brainMask[v]) continue;
      const before = series(image, v),
        after = series(out, v);
      // multiple regression on every true course (partial correlation with one course = its β)
      const fitAll = buildDesign({ timecourses: tcs, T: nt, k, noise: [], mode: 'partial' });
      const betaOf = (x: Float64Array) => {
        let s = 0;
        for (let t = 0; t < nt; t++) s += fitAll.pinv[(1 + i) * nt + t]! * x[t]!;
        return s;
      };
      if (src.kind === 'noise') {
        expect(Math.abs(corr(before, src.timecourse)), `${src.name} before`).toBeGreaterThan(0.2);
        // partial: the noise course's own share is gone (its β in a fit on all courses is ~0)
        expect(Math.abs(betaOf(after) / betaOf(before)), `${src.name} partial`).toBeLessThan(1e-3);
        // full: the residual is orthogonal to every removed course
        expect(Math.abs(corr(series(outFull, v), src.timecourse)), `${src.name} full`).toBeLessThan(1e-3);
      } else {
        const ratio = (betaOf(after) / betaOf(before)) ** 2;
        expect(ratio, `${src.name} variance ratio (source ${i + 1})`).toBeGreaterThan(0.999);
        expect(ratio).toBeLessThan(1.001);
        expect(variance(after), `${src.name} keeps most of its voxel's variance`).toBeGreaterThan(0.3 * variance(before));
      }
    }
  });
});
