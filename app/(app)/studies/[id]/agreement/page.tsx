import type { Metadata } from 'next';
import Link from 'next/link';
import { studyPageAccess } from '@/lib/auth/page-access';
import { leadsStudy } from '@/lib/auth/permissions';
import { loadStudyRatings } from '@/lib/db/queries/agreement';
import { buildAgreementReport } from '@/lib/reports/agreement-report';
import { Panel } from '@/components/ui/panel';
import { Headline } from '@/components/agreement/headline';
import { RunHistogram } from '@/components/agreement/agreement-charts';
import { RaterPairsPanel, RatersVsDecisionsPanel, RunsTable, WeeklyPanel } from '@/components/agreement/agreement-panels';
import { countOf, formatStat } from '@/components/agreement/format';
import { SuggestionsPanel } from '@/components/suggestions/suggestions-panel';

export const metadata: Metadata = { title: 'Agreement' };

const BINS = [-1, 0, 0.2, 0.4, 0.6, 0.8, 1.0001];

export default async function AgreementPage({ params }: { params: Promise<{ id: string }> }) {
  const { access } = await studyPageAccess('agreement.read', (await params).id);
  const studyId = access.studyId;
  const report = buildAgreementReport(await loadStudyRatings({ studyId }));
  const names = new Map(report.raters.map((r) => [String(r.id), r.name]));
  const nameOf = (id: string) => names.get(id) ?? `rater ${id}`;
  const s = report.summary;
  const histogram = BINS.slice(0, -1).map((lo, i) => ({
    bin: i === 0 ? '< 0' : `${lo.toFixed(1)}–${Math.min(1, BINS[i + 1]).toFixed(1)}`,
    runs: report.runs.filter(
      (r) => r.krippendorffAlpha.value != null && r.krippendorffAlpha.value >= lo && r.krippendorffAlpha.value < BINS[i + 1],
    ).length,
  }));

  return (
    <div className="flex flex-col gap-6">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-sm text-ink-muted">
            <Link href={`/studies/${studyId}`} className="hover:text-ink">
              {access.name}
            </Link>
          </p>
          <h1 className="text-xl font-semibold" data-testid="agreement-heading">
            Agreement
          </h1>
        </div>
        <div className="flex gap-3 text-sm">
          <a
            href={`/api/studies/${studyId}/agreement?format=csv`}
            className="rounded border border-line-strong px-3 py-1 hover:bg-ground-raised"
            data-testid="agreement-csv"
          >
            Numbers as CSV
          </a>
          <Link href={`/studies/${studyId}/report`} className="rounded border border-line-strong px-3 py-1 hover:bg-ground-raised">
            Printable report
          </Link>
        </div>
      </header>

      <Panel title="Decisions">
        <p className="text-sm" data-testid="decision-counts">
          {report.decisions.total === 0 ? 'No component has votes yet. ' : null}
          {report.decisions.total} components with votes: {report.decisions.unanimous} unanimous, {report.decisions.majority} by majority,{' '}
          {report.decisions.reconciled + report.decisions.override} decided by a lead,{' '}
          <span className={report.decisions.pending ? 'text-verdict-uncertain' : ''}>{report.decisions.pending} waiting</span>
          {report.decisions.pending && leadsStudy(access) ? (
            <>
              {' '}
              —{' '}
              <Link href={`/studies/${studyId}/reconcile`} className="text-lumen hover:text-lumen-strong">
                reconcile them
              </Link>
            </>
          ) : null}
          .
        </p>
      </Panel>

      {!s ? (
        <Panel title="Not yet">
          <p className="text-sm text-ink-muted" data-testid="agreement-unavailable">
            {report.unavailable}
          </p>
        </Panel>
      ) : (
        <>
          <Headline stats={s.overall} />
          <p className="text-xs text-ink-faint">
            Over {s.items} components and {s.raters.length} raters; votes count once a rater has submitted the run. Intervals: percentile
            bootstrap over components, 1000 resamples, seed 1. Bands after Landis &amp; Koch (1977), upper bounds inclusive. Signal/noise
            labels are imbalanced, so read κ beside PABAK and AC1.
          </p>
          <div className="grid gap-6 lg:grid-cols-2">
            <RaterPairsPanel summary={s} nameOf={nameOf} />
            <RatersVsDecisionsPanel summary={s} nameOf={nameOf} detailed />
            <Panel title="Agreement per run (α)">
              <RunHistogram data={histogram} />
              <RunsTable runs={report.runs} />
            </Panel>
            <WeeklyPanel weeks={report.weeks} />
            <Panel title="By decided noise kind (percent agreement)">
              <table className="w-full text-sm">
                <tbody>
                  {report.byNoiseKind.map((k) => (
                    <tr key={k.noiseKind}>
                      <td>{k.noiseKind}</td>
                      <td className="text-right font-mono">{formatStat(k.percentAgreement, 2)}</td>
                      <td className="text-right text-ink-faint">{countOf(k.items, 'component')}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </Panel>
          </div>
        </>
      )}
      <SuggestionsPanel
        studyId={studyId}
        canManage={leadsStudy(access)}
        raters={(s?.vsDecision ?? []).map((r) => ({
          name: nameOf(r.rater),
          kappa: r.cohenKappa,
          sensitivity: r.sensitivity,
          specificity: r.specificity,
        }))}
      />
    </div>
  );
}
