// Spatial smoothness of the preprocessed data and the effective number of independent voxels.

export interface SmoothnessEstimate {
  /** Lag-1 spatial autocorrelation along x, y, z (neighbour pairs both in the mask). */
  rho: [number, number, number];
  /** Smoothness as full width at half maximum along x, y, z, in voxels (≥ 1). */
  fwhmVoxels: [number, number, number];
  /** V / (FWHMx·FWHMy·FWHMz): the number of resel-like independent samples. */
  effectiveSamples: number;
}

/**
 * Estimates spatial smoothness from the lag-1 autocorrelation of the data between in-mask
 * neighbours along each axis, averaged over up to `maxVolumes` evenly spaced volumes. For white
 * noise smoothed by a Gaussian of width σ voxels the lag-1 correlation is ρ = exp(−1/(4σ²)), so
 * FWHM = σ·√(8 ln 2) = √(−2 ln 2 / ln ρ) voxels (the autocorrelation route of Forman et al. 1995,
 * MRM 33:636; from memory). Neighbouring voxels of smooth data are not independent samples, which
 * makes evidence-based dimensionality overshoot; dividing V by the resel-like volume
 * Π max(1, FWHM) gives the effective sample count used by laplace/aic/mdl.
 * x: time-major Float32Array T × V; maskIndices: in-mask voxel → full-volume linear index (x fastest).
 */
export function estimateSmoothness(
  x: Float32Array,
  T: number,
  V: number,
  maskIndices: Int32Array,
  dims: [number, number, number],
  maxVolumes = 48,
): SmoothnessEstimate {
  const [nx, ny, nz] = dims;
  const lookup = new Int32Array(nx * ny * nz).fill(-1);
  for (let j = 0; j < V; j++) lookup[maskIndices[j]!] = j;
  const strides = [1, nx, nx * ny];
  const step = Math.max(1, Math.floor(T / maxVolumes));
  const rho: [number, number, number] = [0, 0, 0];
  const fwhm: [number, number, number] = [1, 1, 1];
  for (let axis = 0; axis < 3; axis++) {
    const size = dims[axis]!;
    const stride = strides[axis]!;
    // Neighbour pairs (j, w) along this axis, both in the mask.
    const pairsA: number[] = [];
    const pairsB: number[] = [];
    for (let j = 0; j < V; j++) {
      const lin = maskIndices[j]!;
      const coord = Math.floor(lin / stride) % size;
      if (coord + 1 >= size) continue;
      const w = lookup[lin + stride]!;
      if (w >= 0) {
        pairsA.push(j);
        pairsB.push(w);
      }
    }
    if (pairsA.length < 10) continue;
    let sxy = 0,
      sxx = 0,
      syy = 0;
    for (let t = 0; t < T; t += step) {
      const off = t * V;
      for (let q = 0; q < pairsA.length; q++) {
        const a = x[off + pairsA[q]!]!;
        const b = x[off + pairsB[q]!]!;
        sxy += a * b;
        sxx += a * a;
        syy += b * b;
      }
    }
    const r = sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : 0;
    const rc = Math.min(0.999, Math.max(0, r));
    rho[axis] = r;
    fwhm[axis] = rc > 0 ? Math.max(1, Math.sqrt((-2 * Math.LN2) / Math.log(rc))) : 1;
  }
  const effectiveSamples = Math.max(T + 1, V / (fwhm[0] * fwhm[1] * fwhm[2]));
  return { rho, fwhmVoxels: fwhm, effectiveSamples };
}
