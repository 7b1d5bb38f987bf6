// The calibration gate's verdict (lib/agreement/threshold-gate.ts): every set threshold must be
// reached; an undefined statistic does not pass (a number shown must mean what it says).
import { describe, expect, it } from 'vitest';
import { gateVerdict } from '@/lib/agreement/threshold-gate';

const score = (ac1: number | null, sens: number | null, n = 10) => ({
  n,
  gwetAC1: { value: ac1, n, reason: ac1 === null ? 'one category only' : undefined },
  noise: { sensitivity: { value: sens, n, reason: sens === null ? 'no reference noise' : undefined } },
});
const T = { minAc1: 0.8, minSensitivity: 0.85 };

describe('gateVerdict', () => {
  it('no threshold: not gated, passes', () =>
    expect(gateVerdict(null, { minAc1: null, minSensitivity: null })).toEqual({ gated: false, passes: true, reason: null }));
  it('reaching both passes (the bounds are inclusive)', () => expect(gateVerdict(score(0.8, 0.85), T).passes).toBe(true));
  it('names each statistic that misses', () => {
    expect(gateVerdict(score(0.79, 0.5), T).reason).toBe('AC1 0.79 is below 0.80; noise sensitivity 0.50 is below 0.85');
  });
  it('undefined statistics and missing calibration do not pass', () => {
    expect(gateVerdict(score(0.9, null), T)).toMatchObject({
      passes: false,
      reason: expect.stringMatching(/noise sensitivity is undefined \(no reference noise\)/),
    });
    expect(gateVerdict(null, T).reason).toMatch(/has not submitted/);
  });
  it('a named calibration set is named in the reason', () => {
    const named = { ...T, setName: 'Autumn reference set' };
    expect(gateVerdict(score(0.79, 0.9), named).reason).toBe('AC1 0.79 is below 0.80 on the calibration set “Autumn reference set”');
    expect(gateVerdict(null, named).reason).toBe('has not submitted a run of the calibration set “Autumn reference set” yet');
    expect(gateVerdict(score(0.8, 0.85), named)).toEqual({ gated: true, passes: true, reason: null });
  });
});
