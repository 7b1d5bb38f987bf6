/**
 * Small seeded PRNG (mulberry32: 32-bit state, period 2^32; common practice, no source beyond its
 * public-domain reference code). Deterministic for a given seed on every platform, which is what
 * makes bootstrap intervals reproducible. Not for cryptography.
 */
export type Prng = {
  /** Uniform in [0, 1). */
  next(): number;
  /** Uniform integer in [0, n). */
  int(n: number): number;
};

export function createPrng(seed: number): Prng {
  let a = (Math.trunc(seed) >>> 0) ^ 0x9e3779b9;
  const next = (): number => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return { next, int: (n: number) => Math.floor(next() * n) };
}
