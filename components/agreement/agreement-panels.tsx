import type { AgreementReport } from '@/lib/reports/agreement-report';
import type { StudyAgreement } from '@/lib/agreement';
import { Panel } from '@/components/ui/panel';
import { PairMatrix } from './pair-matrix';
import { NoiseRateChart, WeeklyChart } from './agreement-charts';
import { countOf, formatStat } from './format';

type NameOf = (raterId: string) => string;

/** The panels the agreement page and the printable report share: pairs, raters vs decisions, weeks, runs. */
export function RaterPairsPanel({ summary, nameOf }: { summary: StudyAgreement; nameOf: NameOf }) {
  return (
    <Panel title="Rater pairs (Cohen's κ)">
      <PairMatrix pairs={summary.pairs} raters={summary.raters} nameOf={nameOf} />
    </Panel>
  );
}

/** Each rater against the decisions: κ and noise rate, with noise sensitivity/specificity when `detailed`. */
export function RatersVsDecisionsPanel({
  summary,
  nameOf,
  detailed = false,
}: {
  summary: StudyAgreement;
  nameOf: NameOf;
  detailed?: boolean;
}) {
  return (
    <Panel title="Each rater against the decisions">
      <table className="mb-3 w-full text-sm" data-testid="vs-decision">
        <thead className="text-xs text-ink-faint">
          <tr>
            <th className="text-left font-medium">Rater</th>
            <th className="font-medium">κ</th>
            {detailed ? <th className="font-medium">noise sensitivity</th> : null}
            {detailed ? <th className="font-medium">specificity</th> : null}
            <th className="font-medium">noise rate</th>
          </tr>
        </thead>
        <tbody className="font-mono">
          {summary.vsDecision.map((r) => (
            <tr key={r.rater}>
              <td className="font-sans">{nameOf(r.rater)}</td>
              <td className="text-center">{formatStat(r.cohenKappa, 2)}</td>
              {detailed ? <td className="text-center">{formatStat(r.sensitivity, 2)}</td> : null}
              {detailed ? <td className="text-center">{formatStat(r.specificity, 2)}</td> : null}
              <td className="text-center">{formatStat(r.noiseRate, 2)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <NoiseRateChart
        data={summary.vsDecision.map((r) => ({ name: nameOf(r.rater), noiseRate: r.noiseRate.value, kappa: r.cohenKappa.value }))}
      />
    </Panel>
  );
}

export function WeeklyPanel({ weeks }: { weeks: AgreementReport['weeks'] }) {
  return (
    <Panel title="Over time (by week of the last vote)">
      <WeeklyChart
        data={weeks.map((w) => ({ week: w.week, alpha: w.krippendorffAlpha.value, percent: w.percentAgreement.value, items: w.items }))}
      />
    </Panel>
  );
}

/** Krippendorff's α of each run. */
export function RunsTable({ runs }: { runs: AgreementReport['runs'] }) {
  return (
    <table className="mt-3 w-full text-sm" data-testid="run-agreement">
      <tbody>
        {runs.map((r) => (
          <tr key={r.runId}>
            <td className="font-mono">{r.name}</td>
            <td className="text-right font-mono">{formatStat(r.krippendorffAlpha, 2)}</td>
            <td className="text-right text-ink-faint">{countOf(r.items, 'component')}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
