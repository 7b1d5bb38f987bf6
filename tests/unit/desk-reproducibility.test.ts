// The study protocol's rule for low-reproducibility components on the desk (flag / last / hide).
import { describe, expect, it } from 'vitest';
import { arrangeForDesk, isLowReproducibility } from '@/lib/desk/reproducibility';

const comps = [
  { idx: 3, features: { reproducibility: 0.95 } },
  { idx: 1, features: { reproducibility: 0.5 } },
  { idx: 2, features: { reproducibility: null } },
  { idx: 4, features: { reproducibility: 0.79999 } },
  { idx: 5, features: {} },
];
const order = (cs: { idx: number }[]) => cs.map((c) => c.idx);

describe('low reproducibility rule', () => {
  it('below the threshold is low; exactly at it is not; unmeasured (null or absent) is never low', () => {
    expect(isLowReproducibility({ reproducibility: 0.5 }, 0.8)).toBe(true);
    expect(isLowReproducibility({ reproducibility: 0.8 }, 0.8)).toBe(false);
    expect(isLowReproducibility({ reproducibility: null }, 0.8)).toBe(false);
    expect(isLowReproducibility({}, 0.8)).toBe(false);
  });

  it('flag keeps every component in component order', () => {
    expect(arrangeForDesk(comps, { threshold: 0.8, policy: 'flag' })).toEqual({ components: expect.any(Array), hidden: 0 });
    expect(order(arrangeForDesk(comps, { threshold: 0.8, policy: 'flag' }).components)).toEqual([1, 2, 3, 4, 5]);
  });

  it('last moves the low ones to the end, each group in component order', () => {
    expect(order(arrangeForDesk(comps, { threshold: 0.8, policy: 'last' }).components)).toEqual([2, 3, 5, 1, 4]);
  });

  it('hide leaves the low ones out and counts them', () => {
    const r = arrangeForDesk(comps, { threshold: 0.8, policy: 'hide' });
    expect(order(r.components)).toEqual([2, 3, 5]);
    expect(r.hidden).toBe(2);
    expect(arrangeForDesk(comps, { threshold: 0, policy: 'hide' }).hidden).toBe(0);
  });
});
