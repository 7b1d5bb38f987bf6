import type { Metadata } from 'next';
import { readFile } from 'node:fs/promises';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { findStudyRow } from '@/lib/db/queries/studies';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { loadRatingFacts, loadStudyRatings } from '@/lib/db/queries/agreement';
import { readCurrentAgreementReport, refreshCurrentAgreementReport } from '@/lib/releases/current-agreement-report';
import { queueAgreementReport } from '@/lib/releases/queue-agreement-report';
import { findRelease, loadExportRuns, releaseDecisions, storedAgreementReport } from '@/lib/db/queries/releases';
import { buildAgreementReport, type AgreementReport } from '@/lib/reports/agreement-report';
import { methodsParagraph } from '@/lib/reports/methods-paragraph';
import { BOOTSTRAP, methodsInputOf } from '@/lib/releases/create-release';
import { CAUTIONS } from '@/lib/exports/cautions';
import { pathFor } from '@/lib/storage';
import { Panel } from '@/components/ui/panel';
import { Headline } from '@/components/agreement/headline';
import { RaterPairsPanel, RatersVsDecisionsPanel, RunsTable, WeeklyPanel } from '@/components/agreement/agreement-panels';
import { PrintButton } from '@/components/releases/print-button';
import { RefreshWhileComputing } from '@/components/agreement/refresh-while-computing';

export const metadata: Metadata = { title: 'Agreement report' };

const RULES: Record<string, string> = {
  unanimous: 'unanimous votes only; everything else to the lead',
  majority: 'strict majority; ties to the lead',
  lead: 'any disagreement to the lead',
};

export default async function ReportPage({
  params,
  searchParams,
}: {
  params: Promise<{ id: string }>;
  searchParams: Promise<{ release?: string }>;
}) {
  const user = await requirePageUser('agreement.read');
  const studyId = Number((await params).id);
  const access = Number.isInteger(studyId) ? await findStudyAccess({ user, studyId }) : null;
  if (!access) notFound();
  const releaseParam = (await searchParams).release;
  const release = releaseParam ? await findRelease({ releaseId: Number(releaseParam) }) : null;
  if (releaseParam && (!release || release.studyId !== studyId || !release.manifest)) notFound();

  const study = (await findStudyRow({ studyId }))!;
  const runIds = release ? release.manifest!.runs.map((r) => r.runId) : undefined;
  // a release's statistics were computed once by its release job (releases made before that was
  // stored are computed here); the current state's are stored once per change of the ratings
  // (lib/releases/current-agreement-report.ts): stale figures are shown with their time while the
  // worker computes the new ones, and the page reloads itself until they are current
  const stored = release ? ((await storedAgreementReport({ releaseId: release.id })) as AgreementReport | null) : null;
  let report: AgreementReport;
  let runCount: number;
  let computedAt: Date | null = null;
  let computing = false;
  if (!release) {
    let current = await readCurrentAgreementReport({ studyId });
    if (!current.stored) {
      // never computed for this study: compute once now, so the first view has figures
      await refreshCurrentAgreementReport({ studyId });
      current = await readCurrentAgreementReport({ studyId });
    } else if (!current.fresh) {
      computing = true;
      await queueAgreementReport({ studyId }); // the worker computes them (job kind agreement-report)
    }
    report = current.stored!.report;
    runCount = current.stored!.runCount;
    computedAt = current.stored!.computedAt;
  } else if (stored) {
    report = stored;
    runCount = release!.manifest!.runs.length;
  } else {
    const ratings = await loadStudyRatings({ studyId, runIds });
    if (release) {
      const frozen = await releaseDecisions({ releaseId: release.id });
      ratings.decisions = frozen.map(
        (d: { componentId: number; runId: number; label: string; noiseKind: string | null; method: string }) => ({ ...d }),
      );
    }
    report = buildAgreementReport(ratings, BOOTSTRAP);
    runCount = ratings.runs.length;
  }
  let methods: string;
  if (release) {
    const file = release.manifest!.files.find((f) => f.name.endsWith('_desc-methods_report.md'));
    const md = file ? await readFile(pathFor(file.key), 'utf8').catch(() => '') : '';
    methods = md
      .split('\n')
      .filter((l) => l && !l.startsWith('#') && !l.startsWith('- '))
      .join(' ');
  } else {
    const runs = await loadExportRuns({ studyId }, undefined, { timecourses: false });
    methods = runs.length
      ? methodsParagraph(methodsInputOf(runs, study, report, await loadRatingFacts({ studyId })))
      : 'No run has a finished decomposition yet.';
  }
  const names = new Map(report.raters.map((r) => [String(r.id), r.name]));
  const nameOf = (id: string) => names.get(id) ?? `rater ${id}`;
  const s = report.summary;
  const d = report.decisions;
  const labelSet = (typeof study.label_set === 'string' ? JSON.parse(study.label_set) : study.label_set) as string[];

  return (
    <article className="flex flex-col gap-6 print:gap-3" data-testid="report">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-sm text-ink-muted no-print">
            <Link href={`/studies/${studyId}/agreement`} className="hover:text-ink">
              {access.name} · agreement
            </Link>
            {' · '}
            <Link href={`/studies/${studyId}/releases`} className="hover:text-ink" data-testid="releases-link">
              releases
            </Link>
          </p>
          <h1 className="text-xl font-semibold" data-testid="report-heading">
            Agreement report — {access.name}
          </h1>
          <p className="text-sm text-ink-muted" data-testid="report-scope">
            {release
              ? `Release version ${release.version} of ${release.releasedAt.toISOString().slice(0, 10)} (${release.runId ? 'one run' : 'whole study'})`
              : `Current state, figures of ${computedAt ? `${computedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC` : '—'} (not a release)`}
          </p>
          {computing ? (
            <p className="text-sm text-ink-muted no-print" data-testid="report-computing" role="status">
              Votes or decisions changed since these figures: computing… (the page updates by itself)
              <RefreshWhileComputing />
            </p>
          ) : null}
        </div>
        <PrintButton />
      </header>

      <Panel title="Study and protocol">
        <dl className="grid grid-cols-[12rem_1fr] gap-y-1 text-sm">
          <dt className="text-ink-muted">Runs</dt>
          <dd data-testid="report-runs">{runCount}</dd>
          <dt className="text-ink-muted">Components</dt>
          <dd>{d.total}</dd>
          <dt className="text-ink-muted">Raters</dt>
          <dd data-testid="report-raters">{report.raters.map((r) => `${r.name} (${r.votes} votes)`).join(', ') || '—'}</dd>
          <dt className="text-ink-muted">Raters per run</dt>
          <dd>{study.raters_per_run}</dd>
          <dt className="text-ink-muted">Labels</dt>
          <dd>{labelSet.join(', ')}</dd>
          <dt className="text-ink-muted">Consensus rule</dt>
          <dd>{RULES[study.consensus_rule] ?? study.consensus_rule}</dd>
          <dt className="text-ink-muted">Blinding</dt>
          <dd>{study.blinding ? 'on (votes hidden until a rater submits)' : 'off'}</dd>
          <dt className="text-ink-muted">Uncertain components</dt>
          <dd>{study.uncertain_in_export === 'remove' ? 'removed in exports' : 'kept in exports'}</dd>
          <dt className="text-ink-muted">Decisions</dt>
          <dd data-testid="report-decisions">
            {d.unanimous} unanimous, {d.majority} by majority, {d.reconciled} reconciled by a lead, {d.override} set by a lead, {d.pending}{' '}
            pending
          </dd>
        </dl>
      </Panel>

      {s ? (
        <>
          <Headline stats={s.overall} />
          <p className="text-xs text-ink-faint">
            {s.items} components, {s.raters.length} raters. 95% percentile-bootstrap intervals over components ({BOOTSTRAP.resamples}{' '}
            resamples, seed {BOOTSTRAP.seed}); bands after Landis &amp; Koch (1977).
          </p>
          <div className="grid gap-6 lg:grid-cols-2 print:grid-cols-2">
            <RaterPairsPanel summary={s} nameOf={nameOf} />
            <RatersVsDecisionsPanel summary={s} nameOf={nameOf} />
            <WeeklyPanel weeks={report.weeks} />
            <Panel title="Per run (Krippendorff's α)">
              <RunsTable runs={report.runs} />
            </Panel>
          </div>
        </>
      ) : (
        <Panel title="Agreement">
          <p className="text-sm text-ink-muted">{report.unavailable}</p>
        </Panel>
      )}

      <Panel title="Methods paragraph (to paste into a paper)">
        <p className="text-sm leading-relaxed" data-testid="methods-paragraph">
          {methods}
        </p>
      </Panel>
      <Panel title="Cautions">
        <ul className="list-disc pl-5 text-sm" data-testid="report-cautions">
          {CAUTIONS.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      </Panel>
    </article>
  );
}
