// The one tabular writer (lib/exports/tabular.ts) guards every free-text cell of every TSV/CSV
// export against spreadsheet formulas and leaves numbers numeric (issue 13 item 4). The rule —
// prefix ' to cells beginning with = + - @ tab or carriage return — is OWASP's "CSV Injection"
// recommendation; that "-0.25" stays a number is common practice, no source.
import { describe, expect, it } from 'vitest';
import { csvCell, csvLine, guardFormula, parseTsv, toTsv, tsvCell } from '@/lib/exports/tabular';
import { runExportFiles, type RunExportInput } from '@/lib/exports/run-files';
import { EXPORT_FORMAT } from '@/lib/exports/format';

describe('guardFormula', () => {
  it.each([
    ['=HYPERLINK("http://x.example","click")', '\'=HYPERLINK("http://x.example","click")'],
    ['+cmd', "'+cmd"],
    ['-2+3', "'-2+3"],
    ['@SUM(A1:A2)', "'@SUM(A1:A2)"],
    ['\tindent', "'\tindent"],
    ['\rline', "'\rline"],
  ])('prefixes %j', (text, guarded) => expect(guardFormula(text)).toBe(guarded));

  it.each(['-0.25', '+1', '-3e-5', '12', 'edge ring', 'a=b', ''])('leaves %j alone', (text) => expect(guardFormula(text)).toBe(text));
});

describe('TSV and CSV cells', () => {
  it('writes numbers as numbers and guards text in TSV', () => {
    expect(tsvCell(-0.25)).toBe('-0.25');
    expect(tsvCell(-3)).toBe('-3');
    expect(tsvCell('=1+1')).toBe("'=1+1");
    // a tab inside text becomes a space first, so the cell cannot split the row
    expect(tsvCell('a\tb')).toBe('a b');
    expect(
      parseTsv(
        toTsv(
          ['n', 'reason'],
          [
            [-1, '@evil'],
            [2, null],
          ],
        ),
      ).rows,
    ).toEqual([
      ['-1', "'@evil"],
      ['2', 'n/a'],
    ]);
  });

  it('quotes CSV per RFC 4180 after guarding, and keeps numbers numeric', () => {
    expect(csvCell('=A1,"x"')).toBe('"\'=A1,""x"""');
    expect(csvCell(-0.5)).toBe('-0.5');
    expect(csvCell('-0.5000')).toBe('-0.5000');
    expect(csvCell(null)).toBe('');
    expect(csvCell({ note: '=x' })).toBe('"{""note"":""=x""}"');
    expect(csvLine(['+a', 1, 'b'])).toBe("'+a,1,b");
  });
});

describe('release files', () => {
  const input: RunExportInput = {
    stem: 'sub-01_task-rest',
    entities: { sub: '01', ses: null, task: 'rest', acq: null, run: null },
    trSeconds: 2,
    labelSet: ['signal', 'noise'],
    uncertainInExport: 'keep',
    release: { studyId: 1, releaseId: 1, version: 1, releasedAt: '2026-12-04T10:00:00.000Z', software: '0.1.0' },
    components: [
      {
        idx: 1,
        label: 'noise',
        noiseKind: 'motion',
        method: 'reconciled',
        reason: '=HYPERLINK("http://x.example")',
        varianceExplained: 0.2,
        features: { kurtosis: -1.5 },
        votes: [{ raterCode: 'R1', label: 'noise', noiseKind: 'motion' }],
        timecourse: Float32Array.from([-1, 1]),
      },
    ],
  };

  it("guards the lead's free-text reason in the decision table, keep negative numbers, and say so in the sidecar with the format version", () => {
    const files = runExportFiles(input);
    const table = parseTsv(files.find((f) => f.name.endsWith('_desc-decisions_components.tsv'))!.content);
    expect(table.rows[0]![table.header.indexOf('lead_reason')]).toBe('\'=HYPERLINK("http://x.example")');
    const courses = parseTsv(files.find((f) => f.name.endsWith('_desc-sources_timeseries.tsv'))!.content);
    expect(courses.rows.map((r) => r[0])).toEqual(['-1', '1']);
    for (const f of files.filter((x) => x.name.endsWith('.json'))) {
      const sidecar = JSON.parse(f.content);
      expect(sidecar.FormulaGuard, f.name).toMatch(/leading '/);
      expect(sidecar.ExportFormat.Version, f.name).toBe(EXPORT_FORMAT);
    }
  });
});
