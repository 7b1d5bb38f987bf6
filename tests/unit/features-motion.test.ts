import { describe, expect, it } from 'vitest';
import { dropInitialVolumes, framewiseDisplacement, MotionFileError, parseMotionFile, type MotionParams } from '@/lib/decomposition/motion';

function catchError(fn: () => unknown): MotionFileError {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(MotionFileError);
    return e as MotionFileError;
  }
  throw new Error('expected a MotionFileError');
}

describe('parseMotionFile', () => {
  const table = ['# rx ry rz tx ty tz', '0 0 0 0 0 0', '0.01,0.00,-0.02,0.1,0.2,-0.3', '0.00\t0.03\t0.00\t0.5\t0.2\t-0.1', ''].join('\n');

  it('reads mixed separators, skips blank and # lines, maps rot-first columns', () => {
    const m = parseMotionFile(table, { order: 'rot-first', rotationUnits: 'radians', expectedRows: 3 });
    expect(Array.from(m.rotations[0])).toEqual([0, 0.01, 0]);
    expect(Array.from(m.rotations[2])).toEqual([0, -0.02, 0]);
    expect(Array.from(m.translations[0])).toEqual([0, 0.1, 0.5]);
    expect(Array.from(m.translations[2])).toEqual([0, -0.3, -0.1]);
  });

  it('maps trans-first columns and converts degrees to radians (× π/180, SI definition of the degree)', () => {
    const text = '1 2 3 90 180 -45\r\n0 0 0 0 0 0\r\n';
    const m = parseMotionFile(text, { order: 'trans-first', rotationUnits: 'degrees' });
    expect(Array.from(m.translations.map((c) => c[0]))).toEqual([1, 2, 3]);
    expect(m.rotations[0][0]).toBeCloseTo(Math.PI / 2, 15);
    expect(m.rotations[1][0]).toBeCloseTo(Math.PI, 15);
    expect(m.rotations[2][0]).toBeCloseTo(-Math.PI / 4, 15);
  });

  it('refuses 5 columns, naming the line and the count', () => {
    const e = catchError(() => parseMotionFile('0 0 0 0 0 0\n0 0 0 0 0\n', { order: 'rot-first', rotationUnits: 'radians' }));
    expect(e.code).toBe('column_count');
    expect(e.line).toBe(2);
    expect(e.message).toMatch(/line 2 has 5 columns, expected 6/);
  });

  it('refuses a wrong row count, naming both counts', () => {
    const e = catchError(() =>
      parseMotionFile('0 0 0 0 0 0\n1 1 1 1 1 1\n', { order: 'rot-first', rotationUnits: 'radians', expectedRows: 3 }),
    );
    expect(e.code).toBe('row_count');
    expect(e.message).toMatch(/has 2 rows but the run has 3 volumes/);
  });

  it('refuses a text cell, naming the line, the column and the cell', () => {
    const e = catchError(() =>
      parseMotionFile('0 0 0 0 0 0\n0 0 0 0 abc 0\n', {
        order: 'rot-first',
        rotationUnits: 'radians',
      }),
    );
    expect(e.code).toBe('not_numeric');
    expect(e.line).toBe(2);
    expect(e.message).toMatch(/line 2, column 5: 'abc' is not a number/);
  });

  it('quotes at most 40 characters of a huge cell back (issue 13 item 10: a 7 MB cell was echoed)', () => {
    const huge = 'x'.repeat(7_000_000);
    const e = catchError(() => parseMotionFile(`0 0 0 0 0 0\n0 0 ${huge} 0 0 0\n`, { order: 'rot-first', rotationUnits: 'radians' }));
    expect(e.code).toBe('not_numeric');
    expect(e.message).toMatch(/line 2, column 3: 'x{40}… \(7000000 characters\)' is not a number/);
    expect(e.message.length).toBeLessThan(300);
  });

  it('refuses an empty file and NaN cells', () => {
    expect(catchError(() => parseMotionFile('\n# only a comment\n', { order: 'rot-first', rotationUnits: 'radians' })).code).toBe('empty');
    expect(catchError(() => parseMotionFile('0 0 0 NaN 0 0', { order: 'rot-first', rotationUnits: 'radians' })).code).toBe('not_numeric');
  });
});

describe('framewiseDisplacement (Power et al. 2012, NeuroImage 59:2142; rotations on a 50 mm sphere)', () => {
  // Hand-computed table, trans-first columns (tx ty tz in mm, rx ry rz in degrees):
  //   t0:  0    0    0    0    0    0
  //   t1:  0.1 -0.2  0.3  0.5  0    0      FD = 0.1+0.2+0.3 + 50·(0.5·π/180) = 0.6 + 0.436332313 = 1.036332313
  //   t2:  0.1 -0.2  0.3  0.5  0    0      FD = 0
  //   t3:  0   -0.1  0.3  0    0.2 -0.3    FD = 0.1+0.1+0 + 50·(0.5+0.2+0.3)·π/180 = 0.2 + 0.872664626 = 1.072664626
  const text = ['0 0 0 0 0 0', '0.1 -0.2 0.3 0.5 0 0', '0.1 -0.2 0.3 0.5 0 0', '0 -0.1 0.3 0 0.2 -0.3'].join('\n');
  const m = parseMotionFile(text, { order: 'trans-first', rotationUnits: 'degrees', expectedRows: 4 });

  it('matches hand-computed frame differences, FD_0 = 0', () => {
    const fd = framewiseDisplacement(m);
    expect(fd.length).toBe(4);
    expect(fd[0]).toBe(0);
    expect(fd[1]).toBeCloseTo(0.6 + (50 * 0.5 * Math.PI) / 180, 12);
    expect(fd[1]).toBeCloseTo(1.036332313, 8);
    expect(fd[2]).toBe(0);
    expect(fd[3]).toBeCloseTo(1.072664626, 8);
  });

  it('scales the rotation part with the sphere radius', () => {
    const fd = framewiseDisplacement(m, 80);
    expect(fd[1]).toBeCloseTo(0.6 + (80 * 0.5 * Math.PI) / 180, 12);
  });

  it('dropInitialVolumes drops rows and FD restarts at 0', () => {
    const d = dropInitialVolumes(m, 1);
    expect(d.translations[0].length).toBe(3);
    const fd = framewiseDisplacement(d);
    expect(fd[0]).toBe(0);
    expect(fd[2]).toBeCloseTo(1.072664626, 8);
    expect(m.translations[0].length).toBe(4); // the input is not changed
    expect(() => dropInitialVolumes(m, 4)).toThrow(MotionFileError);
    expect(() => dropInitialVolumes(m, -1)).toThrow(/Cannot drop -1/);
  });

  it('refuses columns of different lengths', () => {
    const bad: MotionParams = {
      translations: [new Float64Array(3), new Float64Array(3), new Float64Array(2)],
      rotations: [new Float64Array(3), new Float64Array(3), new Float64Array(3)],
    };
    expect(() => framewiseDisplacement(bad)).toThrow(/different lengths/);
  });
});

describe('parseMotionFile: a line of column names', () => {
  // common practice, no source: motion tables written as TSV carry a header row of column names
  it('skips a first line of column names and still refuses names further down', () => {
    const header = 'tx_mm\tty_mm\ttz_mm\trx_rad\try_rad\trz_rad\n';
    const m = parseMotionFile(`${header}1 2 3 0.1 0.2 0.3\n4 5 6 0.4 0.5 0.6\n`, {
      order: 'trans-first',
      rotationUnits: 'radians',
      expectedRows: 2,
    });
    expect(Array.from(m.translations[0])).toEqual([1, 4]);
    expect(Array.from(m.rotations[2])).toEqual([0.3, 0.6]);
    const e = catchError(() => parseMotionFile(`1 2 3 0.1 0.2 0.3\n${header}`, { order: 'trans-first', rotationUnits: 'radians' }));
    expect(e.code).toBe('not_numeric');
    expect(e.line).toBe(2);
  });
});
