// Axis ticks: nice steps (1, 2, 2.5, 5 × 10ⁿ — common practice, no source) and labels that never repeat.
import { describe, expect, it } from 'vitest';
import { niceStep, niceTicks, tickFormatter } from '@/components/charts/ticks';

const labels = (ticks: number[]) => ticks.map(tickFormatter(ticks));

describe('niceTicks', () => {
  it('covers the range with nice steps', () => {
    expect(niceTicks(0, 1, 5)).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(niceTicks(-0.2, 1, 7)).toEqual([-0.2, 0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(niceTicks(0, 0.25, 5)).toEqual([0, 0.1, 0.2, 0.3]);
    const t = niceTicks(0.013, 0.087, 5);
    expect(t[0]).toBeLessThanOrEqual(0.013);
    expect(t.at(-1)).toBeGreaterThanOrEqual(0.087);
  });

  it('a flat series still gets two distinct ticks', () => {
    expect(niceTicks(3, 3).length).toBeGreaterThanOrEqual(2);
    expect(new Set(niceTicks(0, 0)).size).toBeGreaterThanOrEqual(2);
  });

  it('niceStep rounds up to 1, 2, 2.5 or 5 × 10ⁿ', () => {
    expect(niceStep(0.03)).toBeCloseTo(0.05, 12);
    expect(niceStep(0.21)).toBeCloseTo(0.25, 12);
    expect(niceStep(7)).toBe(10);
    expect(niceStep(1)).toBe(1);
  });
});

describe('tickFormatter', () => {
  it('never repeats a label: spectrum power 0…0.08 was "0.0 0.0 0.0 0.1"', () => {
    const l = labels(niceTicks(0, 0.08, 5));
    expect(new Set(l).size).toBe(l.length);
    expect(l).toEqual(['0.00', '0.02', '0.04', '0.06', '0.08']);
  });

  it('quarter steps keep two decimals; whole steps none', () => {
    expect(labels([0, 0.25, 0.5, 0.75, 1])).toEqual(['0.00', '0.25', '0.50', '0.75', '1.00']);
    expect(labels([0, 50, 100, 150])).toEqual(['0', '50', '100', '150']);
  });

  it('very large or very small values go scientific and stay distinct', () => {
    const big = labels([0, 2e5, 4e5, 6e5]);
    expect(new Set(big).size).toBe(4);
    expect(big[1]).toMatch(/e\+5$/);
    const small = labels([0, 2e-4, 4e-4]);
    expect(new Set(small).size).toBe(3);
  });

  it('no "-0"', () => {
    expect(labels([-0.2, -0.0000000001, 0.2])[1]).toBe('0.0');
  });
});
