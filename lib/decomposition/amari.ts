// Amari performance index of a separation.

/**
 * Amari index of P = W·A (Amari, Cichocki & Yang 1996, NIPS 8, the performance index E), normalised
 * to [0, 1] by 2k(k − 1):
 * E = Σ_i (Σ_j |p_ij| / max_l |p_il| − 1) + Σ_j (Σ_i |p_ij| / max_l |p_lj| − 1).
 * 0 exactly for a scaled permutation. p: k × k, row-major Float64Array or number[][].
 */
export function amariIndex(p: Float64Array | number[][], k?: number): number {
  const n = Array.isArray(p) ? p.length : (k ?? Math.round(Math.sqrt(p.length)));
  const at = (i: number, j: number) => Math.abs(Array.isArray(p) ? p[i]![j]! : p[i * n + j]!);
  if (n < 2) return 0;
  let e = 0;
  for (let i = 0; i < n; i++) {
    let mx = 0,
      s = 0;
    for (let j = 0; j < n; j++) {
      const v = at(i, j);
      s += v;
      if (v > mx) mx = v;
    }
    e += s / mx - 1;
  }
  for (let j = 0; j < n; j++) {
    let mx = 0,
      s = 0;
    for (let i = 0; i < n; i++) {
      const v = at(i, j);
      s += v;
      if (v > mx) mx = v;
    }
    e += s / mx - 1;
  }
  return e / (2 * n * (n - 1));
}
