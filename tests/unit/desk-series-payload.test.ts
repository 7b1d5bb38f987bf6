// The desk's series payload (lib/desk/series-payload.ts): every listed component's time course and
// power spectrum in one binary message. Checks: values come back as IEEE 754 single precision
// (Math.fround, the ECMAScript standard's rounding to float32; the precision the server stores),
// per component id and with each component's own lengths; a component not in the payload is null;
// damaged bytes are refused with a message that says what is wrong.
import { describe, expect, it } from 'vitest';
import { SERIES_MAGIC, decodeSeries, encodeSeries } from '@/lib/desk/series-payload';
import { createRng } from '@/lib/random';

function component(id: number, nTime: number, nFreq: number, seed: number) {
  const rng = createRng(seed);
  return {
    id,
    timecourse: Array.from({ length: nTime }, () => rng.next() * 6 - 3),
    spectrum: Array.from({ length: nFreq }, () => rng.next() * 40),
    frequencies: Array.from({ length: nFreq }, (_, i) => i / (nTime * 2 * 0.8)),
  };
}

describe('desk series payload', () => {
  it('round-trips each component by id at float32 precision', () => {
    const list = [component(41, 300, 151, 1), component(7, 300, 151, 2), component(1000, 12, 7, 3)];
    const payload = decodeSeries(encodeSeries(list));
    expect(payload.count).toBe(3);
    for (const c of list) {
      const got = payload.of(c.id)!;
      expect(got.timecourse).toEqual(c.timecourse.map(Math.fround));
      expect(got.spectrum).toEqual(c.spectrum.map(Math.fround));
      expect(got.frequencies).toEqual(c.frequencies.map(Math.fround));
    }
    expect(payload.of(8)).toBeNull();
    expect(payload.of(41)).toBe(payload.of(41)); // made once
  });

  it('is 4 bytes a value plus 12 a component and 8 in all (80 components of 300 volumes: ≈ 190 KB)', () => {
    const list = Array.from({ length: 80 }, (_, i) => component(i + 1, 300, 151, i));
    expect(encodeSeries(list).byteLength).toBe(8 + 80 * 12 + 80 * (300 + 2 * 151) * 4);
  });

  it('keeps an empty list and empty series', () => {
    expect(decodeSeries(encodeSeries([])).count).toBe(0);
    const got = decodeSeries(encodeSeries([{ id: 3, timecourse: [], spectrum: [], frequencies: [] }])).of(3)!;
    expect(got).toEqual({ timecourse: [], spectrum: [], frequencies: [] });
  });

  it('refuses a spectrum whose length differs from its frequencies', () => {
    expect(() => encodeSeries([{ id: 1, timecourse: [1], spectrum: [1, 2], frequencies: [0] }])).toThrow(
      /2 spectrum values for 1 frequencies/,
    );
  });

  it('says what is wrong with damaged bytes', () => {
    const good = encodeSeries([component(5, 20, 11, 4)]);
    expect(() => decodeSeries(good.subarray(0, 3))).toThrow(/damaged \(too short\)/);
    const wrong = good.slice();
    wrong[0] = 'X'.charCodeAt(0);
    expect(() => decodeSeries(wrong)).toThrow(new RegExp(`not ${SERIES_MAGIC}`));
    expect(() => decodeSeries(good.subarray(0, good.byteLength - 4))).toThrow(/bytes where .* were announced/);
    const huge = good.slice();
    new DataView(huge.buffer).setUint32(4, 1_000_000, true);
    expect(() => decodeSeries(huge)).toThrow(/do not fit/);
  });
});
