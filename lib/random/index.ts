/**
 * Quorum's one seeded pseudo-random generator: mulberry32 (Tommy Ettinger, 2017, public domain;
 * 32-bit state, period 2^32; checked against the author's reference C code in
 * tests/unit/random.test.ts) with a Box–Muller normal sampler (Box & Muller 1958) that keeps the
 * second value of each pair. The same seed gives the same stream on every platform. Not for
 * cryptography.
 *
 * Seeding convention: a seed becomes the generator's 32-bit start state by a named scheme, and the
 * parts of one computation take their own seeds with childSeed(seed, label).
 * - 'hashed' (the default; use it for anything new): murmur3's 32-bit finaliser over
 *   seed XOR 0x9e3779b9, so nearby seeds (1, 2, 3) give unrelated streams. The phantom uses it.
 * - 'golden-xor': seed XOR 0x9e3779b9 (the golden-ratio constant). The agreement bootstrap and the
 *   subject folds of the suggestion model use it, so released reports' intervals and stored model
 *   evaluations keep their values.
 * - 'direct': the seed itself. FastICA's starting matrices use it, so a stored decomposition's
 *   `seed` still reproduces it.
 * The three schemes are the three generators Quorum had before this module (lib/agreement/prng.ts,
 * lib/decomposition/random.ts, lib/phantom/random.ts); their streams are unchanged, bit for bit.
 */

export type SeedScheme = 'hashed' | 'golden-xor' | 'direct';

export interface Rng {
  /** Uniform on [0, 1), in steps of 2^-32. */
  next(): number;
  /** Standard normal N(0, 1). */
  gauss(): number;
  /** Uniform on [lo, hi). */
  uniform(lo: number, hi: number): number;
  /** Uniform integer on [0, n). */
  int(n: number): number;
}

const GOLDEN = 0x9e3779b9;

/** The generator's 32-bit start state for a seed under a scheme. */
export function startState(seed: number, scheme: SeedScheme = 'hashed'): number {
  if (scheme === 'direct') return seed >>> 0;
  if (scheme === 'golden-xor') return ((Math.trunc(seed) >>> 0) ^ GOLDEN) >>> 0;
  let h = (Math.floor(seed) ^ GOLDEN) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b) >>> 0;
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35) >>> 0;
  return (h ^ (h >>> 16)) >>> 0;
}

/** A seeded generator. Its methods are closures: `const g = createRng(1).gauss` may be passed on alone. */
export function createRng(seed: number, scheme: SeedScheme = 'hashed'): Rng {
  // State lives in a typed array: a uint32 kept in a closure variable would be boxed on every step.
  const st = new Uint32Array(1);
  st[0] = startState(seed, scheme);
  const spare = new Float64Array(1);
  let hasSpare = false;
  const next = (): number => {
    const s = (st[0] = st[0] + 0x6d2b79f5);
    let t = Math.imul(s ^ (s >>> 15), s | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const gauss = (): number => {
    if (hasSpare) {
      hasSpare = false;
      return spare[0];
    }
    let u = next();
    while (u <= 1e-300) u = next();
    const r = Math.sqrt(-2 * Math.log(u));
    const a = 2 * Math.PI * next();
    spare[0] = r * Math.sin(a);
    hasSpare = true;
    return r * Math.cos(a);
  };
  return {
    next,
    gauss,
    uniform: (lo, hi) => lo + (hi - lo) * next(),
    int: (n) => Math.min(n - 1, Math.floor(next() * n)),
  };
}

/** Derives an independent child seed from a parent seed and a label (FNV-1a over the label). */
export function childSeed(seed: number, label: string): number {
  let h = 0x811c9dc5 ^ (Math.floor(seed) >>> 0);
  for (let i = 0; i < label.length; i++) h = Math.imul(h ^ label.charCodeAt(i), 0x01000193) >>> 0;
  return h >>> 0;
}
