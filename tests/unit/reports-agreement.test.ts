import { describe, expect, it } from 'vitest';
import { buildAgreementReport, isoWeek } from '@/lib/reports/agreement-report';
import { agreementReportCsv } from '@/lib/reports/agreement-csv';

describe('isoWeek', () => {
  // ISO 8601 week dates (common practice, no source for these particular dates beyond the rule:
  // week 1 is the week with the year's first Thursday).
  it('follows the ISO 8601 rule at year boundaries', () => {
    expect(isoWeek(new Date('2026-12-01T12:00:00Z'))).toBe('2026-W49');
    expect(isoWeek(new Date('2021-01-03T12:00:00Z'))).toBe('2020-W53');
    expect(isoWeek(new Date('2024-12-30T12:00:00Z'))).toBe('2025-W01');
  });
});

const at = new Date('2026-11-30T10:00:00Z');
function votes(labels: Record<string, string[]>) {
  // labels: rater name -> label per component (components 1..n, all in run 7)
  return Object.entries(labels).flatMap(([rater, ls], r) =>
    ls.map((label, i) => ({
      componentId: i + 1,
      runId: 7,
      raterId: r + 1,
      raterName: rater,
      label,
      noiseKind: label === 'noise' ? 'motion' : null,
      updatedAt: at,
    })),
  );
}

describe('buildAgreementReport', () => {
  it('says why there is nothing to show with one rater', () => {
    const report = buildAgreementReport({
      categories: ['signal', 'noise', 'uncertain'],
      noiseKinds: ['motion'],
      votes: votes({ A: ['noise', 'signal'] }),
      decisions: [],
      runs: [],
    });
    expect(report.summary).toBeNull();
    expect(report.unavailable).toMatch(/two raters/);
  });

  it('computes perfect agreement for identical raters and names runs in BIDS style', () => {
    const labels = ['noise', 'signal', 'signal', 'noise', 'signal', 'uncertain'];
    const report = buildAgreementReport(
      {
        categories: ['signal', 'noise', 'uncertain'],
        noiseKinds: ['motion', 'csf'],
        votes: votes({ A: labels, B: labels }),
        decisions: labels.map((label, i) => ({
          componentId: i + 1,
          runId: 7,
          label,
          noiseKind: label === 'noise' ? 'motion' : null,
          method: 'unanimous',
        })),
        runs: [{ id: 7, sub: '01', ses: '1', task: 'rest', runLabel: null }],
      },
      { resamples: 200 },
    );
    expect(report.summary?.overall.percentAgreement.value).toBe(1);
    expect(report.summary?.overall.krippendorffAlpha.value).toBeCloseTo(1, 12);
    expect(report.runs[0].name).toBe('sub-01_ses-1_task-rest');
    expect(report.weeks).toEqual([expect.objectContaining({ week: '2026-W49', items: 6 })]);
    expect(report.byNoiseKind).toEqual([expect.objectContaining({ noiseKind: 'motion', items: 2 })]);
    expect(report.decisions).toMatchObject({ total: 6, unanimous: 6, pending: 0 });
    const csv = agreementReportCsv(report, (id) => (id === '1' ? 'A' : 'B'));
    expect(csv).toContain('krippendorffAlpha,1.0000');
    expect(csv).toContain('A,B,6,1.0000,1.0000');
  });
});
