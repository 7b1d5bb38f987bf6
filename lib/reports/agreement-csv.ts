import type { AgreementReport } from './agreement-report';
import type { StatResult } from '@/lib/agreement';
import { csvLine } from '@/lib/exports/tabular';

const num = (s: StatResult | null | undefined) => (s?.value == null ? '' : s.value.toFixed(4));
const rows = (header: string[], body: unknown[][]) => [header, ...body].map(csvLine).join('\n');

/** The agreement report's numbers as CSV sections (one table after another, each with its own header). */
export function agreementReportCsv(report: AgreementReport, nameOf: (raterId: string) => string): string {
  const s = report.summary;
  if (!s) return rows(['note'], [[report.unavailable ?? 'no agreement yet']]);
  const o = s.overall;
  const overall = (['percentAgreement', 'fleissKappa', 'krippendorffAlpha', 'pabak', 'gwetAC1'] as const).map((k) => [
    k,
    num(o[k]),
    o[k].ci?.lower == null ? '' : o[k].ci!.lower!.toFixed(4),
    o[k].ci?.upper == null ? '' : o[k].ci!.upper!.toFixed(4),
    o[k].n,
    'band' in o[k] ? ((o[k] as { band?: string | null }).band ?? '') : '',
    o[k].reason ?? '',
  ]);
  return [
    '# overall',
    rows(['statistic', 'value', 'ci_lower', 'ci_upper', 'components', 'band', 'note'], overall),
    '',
    '# rater pairs',
    rows(
      ['rater_a', 'rater_b', 'components', 'cohen_kappa', 'percent_agreement'],
      s.pairs.map((p) => [nameOf(p.raterA), nameOf(p.raterB), p.n, num(p.cohenKappa), num(p.percentAgreement)]),
    ),
    '',
    '# raters against decisions',
    rows(
      ['rater', 'components', 'cohen_kappa', 'noise_sensitivity', 'noise_specificity', 'noise_rate'],
      s.vsDecision.map((r) => [nameOf(r.rater), r.n, num(r.cohenKappa), num(r.sensitivity), num(r.specificity), num(r.noiseRate)]),
    ),
    '',
    '# runs',
    rows(
      ['run', 'components', 'raters', 'krippendorff_alpha', 'percent_agreement'],
      report.runs.map((r) => [r.name, r.items, r.raters, num(r.krippendorffAlpha), num(r.percentAgreement)]),
    ),
    '',
    '# weeks (by the last vote on a component)',
    rows(
      ['week', 'components', 'krippendorff_alpha', 'percent_agreement'],
      report.weeks.map((w) => [w.week, w.items, num(w.krippendorffAlpha), num(w.percentAgreement)]),
    ),
    '',
    '# decided noise kinds',
    rows(
      ['noise_kind', 'components', 'percent_agreement'],
      report.byNoiseKind.map((k) => [k.noiseKind, k.items, num(k.percentAgreement)]),
    ),
    '',
  ].join('\n');
}
