// Reading a stored decomposition summary's warnings back for the runs table and the desk.
import { describe, expect, it } from 'vitest';
import { decompositionWarnings, WARNING_SHORT } from '@/lib/decomposition/warnings';

describe('decompositionWarnings', () => {
  const w = { code: 'dimension_at_bound', message: 'The automatic number of components reached its search bound.' };
  it('reads the whole summary, its warnings array, as JSON text or parsed', () => {
    expect(decompositionWarnings({ components: 26, warnings: [w] })).toEqual([w]);
    expect(decompositionWarnings(JSON.stringify({ components: 26, warnings: [w] }))).toEqual([w]);
    expect(decompositionWarnings(JSON.stringify([w]))).toEqual([w]);
    expect(decompositionWarnings(Buffer.from(JSON.stringify([w])))).toEqual([w]);
  });
  it('older summaries without warnings, SQL NULL and malformed entries give none', () => {
    expect(decompositionWarnings({ components: 10 })).toEqual([]);
    expect(decompositionWarnings(null)).toEqual([]);
    expect(decompositionWarnings('not json')).toEqual([]);
    expect(decompositionWarnings([{ code: 1 }, w])).toEqual([w]);
  });
  it('has short words for both engine warnings', () => {
    expect(Object.keys(WARNING_SHORT).sort()).toEqual(['dimension_at_bound', 'ica_not_converged']);
  });
});
