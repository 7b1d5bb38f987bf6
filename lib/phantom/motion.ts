// Simulated rigid head motion: slow drift plus a few sudden jerks, and the rim time course it drives.
import type { Rng } from '@/lib/random';
import { bandLimitedNoise, zscore } from './time-courses';

export interface MotionParameters {
  /** tx, ty, tz in mm, each length nt. */
  translations: Float64Array[];
  /** rx, ry, rz in radians, each length nt. */
  rotations: Float64Array[];
}

/**
 * Six rigid-body parameters per volume: a slow drift (band-limited below 0.02 Hz plus a linear
 * creep; translations SD ≈ 0.15 mm, rotations SD ≈ 0.0025 rad) and 2–4 jerks, each a displacement
 * of 0.3–1.0 mm (0.004–0.012 rad) lasting 1–2 volumes and then half recovered. Everything scales with
 * motionScale. Units: mm and radians; arrays of length nt.
 */
export function simulateMotion(nt: number, trSeconds: number, motionScale: number, rng: Rng): MotionParameters {
  const make = (sd: number): Float64Array => {
    const p = bandLimitedNoise(nt, trSeconds, 0.001, 0.02, rng, 1);
    const creep = rng.gauss() * sd;
    for (let t = 0; t < nt; t++) p[t] = (p[t] * sd + (creep * t) / Math.max(1, nt - 1)) * motionScale;
    return p;
  };
  const translations = [0, 1, 2].map(() => make(0.15));
  const rotations = [0, 1, 2].map(() => make(0.0025));
  const nJerks = 2 + rng.int(3);
  for (let j = 0; j < nJerks; j++) {
    const t0 = 3 + rng.int(Math.max(1, nt - 6));
    const len = 1 + rng.int(2);
    const dirT = [rng.gauss(), rng.gauss(), rng.gauss()];
    const dirR = [rng.gauss(), rng.gauss(), rng.gauss()];
    const nT = Math.hypot(...dirT) || 1;
    const nR = Math.hypot(...dirR) || 1;
    const magT = rng.uniform(0.3, 1.0) * motionScale;
    const magR = rng.uniform(0.004, 0.012) * motionScale;
    for (let t = t0; t < nt; t++) {
      const f = t < t0 + len ? 1 : 0.5; // sudden displacement, then half recovered (a new position)
      for (let a = 0; a < 3; a++) {
        translations[a][t] += (f * magT * dirT[a]) / nT;
        rotations[a][t] += (f * magR * dirR[a]) / nR;
      }
    }
  }
  return { translations, rotations };
}

/**
 * Time course of the motion-like rim source, derived from the motion: a fixed random projection
 * of the six parameters (rotations converted to mm of arc on a 50 mm sphere, as in framewise
 * displacement, Power et al. 2012) plus the framewise displacement itself (so jerks show as spikes),
 * z-scored and multiplied by amplitude·motionScale (fractional signal change). Length nt.
 */
export function rimTimecourse(m: MotionParameters, amplitude: number, motionScale: number, rng: Rng): Float64Array {
  const nt = m.translations[0].length;
  const params = [...m.translations, ...m.rotations.map((r) => r.map((v) => v * 50))];
  const w = params.map(() => rng.gauss());
  const out = new Float64Array(nt);
  for (let t = 0; t < nt; t++) {
    let s = 0;
    let fd = 0;
    for (let p = 0; p < 6; p++) {
      s += w[p] * params[p][t];
      if (t > 0) fd += Math.abs(params[p][t] - params[p][t - 1]);
    }
    out[t] = s + 1.5 * fd;
  }
  if (motionScale === 0) return new Float64Array(nt);
  zscore(out);
  for (let t = 0; t < nt; t++) out[t] *= amplitude * motionScale;
  return out;
}
