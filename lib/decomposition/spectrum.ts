// Power spectral density of a component time course by Welch's method, for the rating desk's
// spectrum plot and the high-frequency-power feature.

/** Raised for an unusable time course, TR or segment length. */
export class SpectrumError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'SpectrumError';
  }
}

/**
 * Default Welch segment length for a series of T samples: the smallest power of two ≥ T/4, but at
 * least 32, and never more than T. About seven half-overlapping segments for long runs, which
 * trades frequency resolution (1/(nperseg·TR) Hz) for a less noisy estimate. Our own choice.
 */
export function defaultSegmentLength(t: number): number {
  const pow2 = 2 ** Math.ceil(Math.log2(Math.max(t / 4, 1)));
  return Math.min(t, Math.max(32, pow2));
}

/**
 * One-sided power spectral density by Welch's method (Welch 1967, IEEE Trans. Audio
 * Electroacoustics 15:70), following the conventions of scipy.signal.welch: periodic Hann window
 * of length nperseg, 50 % overlap (noverlap = floor(nperseg/2)), nfft = nperseg, each segment's
 * mean removed (detrend 'constant'), scaling 'density' (1 / (fs·Σw²)), one-sided with the non-DC,
 * non-Nyquist bins doubled, segments averaged by their mean.
 *
 * Segment layout (`layout`): scipy places segments every nperseg − noverlap samples from the
 * start and ignores trailing samples that do not fill a segment (padded=False, boundary=None):
 * for T = 156, nperseg 64 that leaves out the last 28 volumes, so a spike there never reaches the
 * spectrum. Our default 'cover' keeps scipy's segment length and count rule but spreads the
 * segments evenly so the first starts at volume 0 and the last ends at volume T − 1: n =
 * ⌈(T − nperseg)/step⌉ + 1 segments starting at round(i·(T − nperseg)/(n − 1)), i = 0..n−1. Every
 * kept volume is then in at least one segment, overlaps are ≥ 50 % (slightly more when T − nperseg
 * is not a multiple of the step), and when it is a multiple the result equals scipy's exactly.
 * We chose this over zero-padding the tail (which would add a partly empty, down-weighted
 * segment) or a final extra segment (which would weight the last volumes twice as much as the
 * rest). 'scipy' reproduces scipy's layout (used to check against its output).
 *
 * `tc`: time course, length T, one sample per volume. `trSeconds`: repetition time in s, so
 * fs = 1/TR Hz. Returns `frequencies` in Hz (k·fs/nperseg, k = 0..floor(nperseg/2)) and `power`
 * in (units of tc)² per Hz. Σ power·Δf approximates the variance of tc (Parseval).
 * Power-of-two segment lengths use a radix-2 FFT; others a direct DFT (O(nperseg²)).
 */
export function powerSpectrum(
  tc: Float64Array | Float32Array,
  trSeconds: number,
  opts: { segmentLength?: number; layout?: 'cover' | 'scipy' } = {},
): { frequencies: Float64Array; power: Float64Array } {
  const t = tc.length;
  if (!Number.isFinite(trSeconds) || trSeconds <= 0) {
    throw new SpectrumError(`TR must be a positive number of seconds, got ${trSeconds}; check pixdim[4] and xyzt_units of the run.`);
  }
  if (t < 2) {
    throw new SpectrumError(`A power spectrum needs at least 2 time points, got ${t}.`);
  }
  for (let i = 0; i < t; i++) {
    if (!Number.isFinite(tc[i])) {
      throw new SpectrumError(`Time course value at volume ${i} is not finite (${tc[i]}); the decomposition produced invalid numbers.`);
    }
  }
  const nperseg = opts.segmentLength ?? defaultSegmentLength(t);
  if (!Number.isInteger(nperseg) || nperseg < 2 || nperseg > t) {
    throw new SpectrumError(`segmentLength must be an integer between 2 and the number of time points (${t}), got ${nperseg}.`);
  }
  const fs = 1 / trSeconds;
  const noverlap = Math.floor(nperseg / 2);
  const step = nperseg - noverlap;
  const cover = (opts.layout ?? 'cover') === 'cover';
  const nseg = cover ? Math.ceil((t - nperseg) / step) + 1 : Math.floor((t - noverlap) / step);
  const startOf = (s: number) => (cover ? (nseg === 1 ? 0 : Math.round((s * (t - nperseg)) / (nseg - 1))) : s * step);
  const nfreq = Math.floor(nperseg / 2) + 1;

  const window = new Float64Array(nperseg);
  let sumW2 = 0;
  for (let n = 0; n < nperseg; n++) {
    window[n] = 0.5 - 0.5 * Math.cos((2 * Math.PI * n) / nperseg);
    sumW2 += window[n] * window[n];
  }
  const scale = 1 / (fs * sumW2);

  const dft = makeRealDft(nperseg);
  const re = new Float64Array(nperseg);
  const im = new Float64Array(nperseg);
  const power = new Float64Array(nfreq);
  for (let s = 0; s < nseg; s++) {
    const start = startOf(s);
    let mean = 0;
    for (let n = 0; n < nperseg; n++) mean += tc[start + n];
    mean /= nperseg;
    for (let n = 0; n < nperseg; n++) {
      re[n] = (tc[start + n] - mean) * window[n];
      im[n] = 0;
    }
    dft(re, im);
    for (let k = 0; k < nfreq; k++) power[k] += re[k] * re[k] + im[k] * im[k];
  }
  const evenNyquist = nperseg % 2 === 0;
  for (let k = 0; k < nfreq; k++) {
    let p = (power[k] * scale) / nseg;
    if (k !== 0 && !(evenNyquist && k === nfreq - 1)) p *= 2;
    power[k] = p;
  }
  const frequencies = new Float64Array(nfreq);
  for (let k = 0; k < nfreq; k++) frequencies[k] = (k * fs) / nperseg;
  return { frequencies, power };
}

/** In-place forward DFT X_k = Σ x_n e^{−2πikn/N} of (re, im), length N; FFT when N is a power of two. */
function makeRealDft(nLen: number): (re: Float64Array, im: Float64Array) => void {
  const cos = new Float64Array(nLen);
  const sin = new Float64Array(nLen);
  for (let k = 0; k < nLen; k++) {
    cos[k] = Math.cos((2 * Math.PI * k) / nLen);
    sin[k] = Math.sin((2 * Math.PI * k) / nLen);
  }
  if ((nLen & (nLen - 1)) === 0) return (re, im) => fftRadix2(re, im, cos, sin);
  const outRe = new Float64Array(nLen);
  const outIm = new Float64Array(nLen);
  return (re, im) => {
    for (let k = 0; k < nLen; k++) {
      let sr = 0;
      let si = 0;
      let idx = 0;
      for (let n = 0; n < nLen; n++) {
        // e^{−iθ} = cos θ − i sin θ, θ = 2π·k·n/N, index k·n mod N into the tables.
        const c = cos[idx];
        const s = sin[idx];
        sr += re[n] * c + im[n] * s;
        si += im[n] * c - re[n] * s;
        idx += k;
        if (idx >= nLen) idx -= nLen;
      }
      outRe[k] = sr;
      outIm[k] = si;
    }
    re.set(outRe);
    im.set(outIm);
  };
}

/** Iterative radix-2 Cooley–Tukey FFT, in place; cos/sin tables of 2πk/N for k < N. */
function fftRadix2(re: Float64Array, im: Float64Array, cos: Float64Array, sin: Float64Array): void {
  const n = re.length;
  for (let i = 1, j = 0; i < n; i++) {
    let bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) {
      let tmp = re[i];
      re[i] = re[j];
      re[j] = tmp;
      tmp = im[i];
      im[i] = im[j];
      im[j] = tmp;
    }
  }
  for (let size = 2; size <= n; size <<= 1) {
    const half = size >> 1;
    const stride = n / size;
    for (let start = 0; start < n; start += size) {
      for (let k = 0; k < half; k++) {
        const c = cos[k * stride];
        const s = sin[k * stride];
        const a = start + k;
        const b = a + half;
        const tr = re[b] * c + im[b] * s;
        const ti = im[b] * c - re[b] * s;
        re[b] = re[a] - tr;
        im[b] = im[a] - ti;
        re[a] += tr;
        im[a] += ti;
      }
    }
  }
}
