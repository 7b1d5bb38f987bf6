// Source time courses of the phantom: band-limited random signals built from DFT-bin sinusoids.
import type { Rng } from '@/lib/random';

/**
 * Band-limited Gaussian-like noise: Σ_k A_k cos(2π f_k t + φ_k) over the DFT frequencies
 * f_k = k / (nt·TR) (Hz) with fLo ≤ f_k ≤ fHi, A_k Rayleigh-distributed times f_k^(−slope/2)
 * (slope 1 gives a 1/f-like power spectrum), φ_k uniform; then z-scored (mean 0, SD 1).
 * Because only in-band bins are used, all power of the result lies in [fLo, fHi] exactly.
 * If the band holds no bin, the nearest bin is used. Returns Float64Array of length nt.
 */
export function bandLimitedNoise(nt: number, trSeconds: number, fLo: number, fHi: number, rng: Rng, slope = 0): Float64Array {
  const df = 1 / (nt * trSeconds);
  const kMax = Math.floor(nt / 2);
  let k0 = Math.max(1, Math.ceil(fLo / df - 1e-9));
  let k1 = Math.min(kMax - (nt % 2 === 0 ? 1 : 0), Math.floor(fHi / df + 1e-9));
  if (k1 < k0) {
    k0 = Math.min(kMax, Math.max(1, Math.round((fLo + fHi) / 2 / df)));
    k1 = k0;
  }
  const out = new Float64Array(nt);
  for (let k = k0; k <= k1; k++) {
    const amp = Math.hypot(rng.gauss(), rng.gauss()) * Math.pow(k * df, -slope / 2);
    const phase = 2 * Math.PI * rng.next();
    const w = (2 * Math.PI * k) / nt;
    for (let n = 0; n < nt; n++) out[n] += amp * Math.cos(w * n + phase);
  }
  return zscore(out);
}

/** Subtracts the mean and divides by the (population) SD in place; an all-constant input becomes zeros. */
export function zscore(x: Float64Array): Float64Array {
  const n = x.length;
  let m = 0;
  for (let i = 0; i < n; i++) m += x[i];
  m /= n || 1;
  let v = 0;
  for (let i = 0; i < n; i++) v += (x[i] - m) ** 2;
  const sd = Math.sqrt(v / (n || 1));
  for (let i = 0; i < n; i++) x[i] = sd > 1e-12 ? (x[i] - m) / sd : 0;
  return x;
}

/** Multiplies a series by a constant in place (e.g. SD 1 → fractional signal change). */
export function scale(x: Float64Array, factor: number): Float64Array {
  for (let i = 0; i < x.length; i++) x[i] *= factor;
  return x;
}

/**
 * Periodic slice dropout: 0 most of the time, −1 in volumes spaced `period` ± 1 apart (first at a
 * random offset), with the drop depth varying by ±20 %. Length nt, unitless (scaled by the caller).
 */
export function sliceDropout(nt: number, period: number, rng: Rng): Float64Array {
  const out = new Float64Array(nt);
  let t = rng.int(Math.max(1, period));
  while (t < nt) {
    out[t] = -(0.8 + 0.4 * rng.next());
    t += Math.max(2, period + rng.int(3) - 1);
  }
  return out;
}
