// Header layout and codes of the NIfTI standard. Offsets are checked against what the standard's
// own C library tool reports (nifti_tool 2.09, Debian nifti-bin; tests/fixtures/nifti/nifti-tool-offsets.json,
// written by scripts/reference/make-nifti-fixtures.py); codes against nifti1.h (from memory) and
// nibabel 5.0.0 (reference.json datatype codes).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DATATYPE_CODES, SPACE_UNITS, TIME_UNITS } from '@/lib/nifti';
import { NIFTI1_SWAPPED, NIFTI2_SWAPPED } from '@/lib/nifti/codes';
import { N1, N2 } from '@/lib/nifti/header-layout';

const tool = JSON.parse(readFileSync('tests/fixtures/nifti/nifti-tool-offsets.json', 'utf8')) as {
  tool: string;
  nifti1: Record<string, { offset: number }>;
  nifti2: Record<string, { offset: number }>;
};
const ref = JSON.parse(readFileSync('tests/fixtures/nifti/reference.json', 'utf8')) as { cases: { file: string; datatypeCode: number }[] };

describe(`field offsets match ${tool.tool}`, () => {
  it('NIfTI-1 (nifti1.h nifti_1_header, 348 bytes)', () => {
    for (const [field, offset] of Object.entries(N1)) expect([field, offset]).toEqual([field, tool.nifti1[field].offset]);
    expect(Object.keys(N1).length).toBeGreaterThan(25);
  });
  it('NIfTI-2 (nifti2.h nifti_2_header, 540 bytes)', () => {
    for (const [field, offset] of Object.entries(N2)) expect([field, offset]).toEqual([field, tool.nifti2[field].offset]);
    // unused_str[15] is the last field and ends at 540 (nifti2.h).
    expect(tool.nifti2.unused_str.offset + 15).toBe(540);
  });
});

describe('codes', () => {
  it('datatype codes (nifti1.h DT_*, from memory) agree with the codes nibabel 5.0.0 wrote', () => {
    expect(DATATYPE_CODES).toEqual({ uint8: 2, int16: 4, int32: 8, float32: 16, float64: 64, int8: 256, uint16: 512, uint32: 768 });
    for (const [name, code] of Object.entries(DATATYPE_CODES)) {
      expect(ref.cases.find((c) => c.file === `dtype-${name}.nii`)!.datatypeCode).toBe(code);
    }
  });
  it('unit codes (nifti1.h NIFTI_UNITS_*, from memory)', () => {
    expect(SPACE_UNITS).toEqual({ 0: 'unknown', 1: 'm', 2: 'mm', 3: 'um' });
    expect(TIME_UNITS[8].seconds).toBe(1);
    expect(TIME_UNITS[16].seconds).toBe(1e-3);
    expect(TIME_UNITS[24].seconds).toBe(1e-6);
  });
  it('swapped sizeof_hdr values are 348 and 540 byte-reversed (nifti1.h / nifti2.h byte-swap detection)', () => {
    const swapped = (n: number) => {
      const v = new DataView(new ArrayBuffer(4));
      v.setInt32(0, n, true);
      return v.getInt32(0, false);
    };
    expect(NIFTI1_SWAPPED).toBe(1543569408);
    expect(NIFTI2_SWAPPED).toBe(469893120);
    expect(swapped(348)).toBe(NIFTI1_SWAPPED);
    expect(swapped(540)).toBe(NIFTI2_SWAPPED);
  });
});
