import type { Metadata } from 'next';
import Link from 'next/link';
import { studyPageAccess } from '@/lib/auth/page-access';
import { can } from '@/lib/auth/permissions';
import { leadsStudy } from '@/lib/auth/permissions';
import { changedSinceRelease, listReleases, openReleaseJob, releaseReadiness, runReadiness } from '@/lib/db/queries/releases';
import { bidsName, distinctRunNames } from '@/lib/bids';
import { refusalOf } from '@/lib/releases/create-release';
import { Panel } from '@/components/ui/panel';
import { ReleaseAction } from '@/components/releases/release-action';
import { DenoiseControl } from '@/components/releases/denoise-control';

export const metadata: Metadata = { title: 'Releases' };

const kb = (n: number) => (n < 1024 * 1024 ? `${(n / 1024).toFixed(1)} kB` : `${(n / 1024 / 1024).toFixed(1)} MB`);

export default async function ReleasesPage({ params }: { params: Promise<{ id: string }> }) {
  const { user, access } = await studyPageAccess('releases.read', (await params).id);
  const studyId = access.studyId;
  const isLead = leadsStudy(access) && can(user.role, 'releases.create');
  const mayDenoise = leadsStudy(access) && can(user.role, 'denoise.request');
  const readiness = await releaseReadiness({ studyId });
  const refusal = refusalOf(readiness, studyId);
  const releases = await listReleases({ studyId });
  const perRun = isLead
    ? distinctRunNames(
        (await runReadiness({ studyId })).map((r) => ({ runId: r.runId, name: bidsName(r), components: r.components, waiting: r.waiting })),
      )
    : [];
  const latestStudy = releases.find((r) => r.runId == null);
  const changed = latestStudy ? await changedSinceRelease({ releaseId: latestStudy.id }) : 0;
  // a release the worker is still building (asked for before this page was opened) is followed too
  const building = isLead ? await openReleaseJob({ studyId }) : null;

  return (
    <div className="flex flex-col gap-6">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-sm text-ink-muted">
            <Link href={`/studies/${studyId}`} className="hover:text-ink">
              {access.name}
            </Link>
          </p>
          <h1 className="text-xl font-semibold" data-testid="releases-heading">
            Releases
          </h1>
        </div>
        <Link
          href={`/studies/${studyId}/report`}
          className="rounded border border-line-strong px-3 py-1 text-sm hover:bg-ground-raised"
          data-testid="report-link"
        >
          Printable agreement report
        </Link>
      </header>

      <Panel title="Ready to release?">
        <p className="mb-3 text-sm" data-testid="release-readiness">
          {readiness.runs} runs, {readiness.components} components; {readiness.pending} pending, {readiness.undecided} without votes.
          {readiness.notReady.length ? ` ${readiness.notReady.length} run(s) are not ready and will not be part of a release.` : ''}
          {latestStudy && changed
            ? ` ${changed} decision(s) changed since version ${latestStudy.version}: release again to publish them.`
            : ''}
        </p>
        {isLead ? (
          <ReleaseAction
            studyId={studyId}
            studyName={access.name}
            refusal={refusal}
            pending={readiness.pending + readiness.undecided}
            runs={perRun}
            studyRuns={readiness.runs}
            studyComponents={readiness.components}
            buildingJobId={building}
          />
        ) : (
          <p className="text-sm text-ink-muted">Only the study&apos;s leads release.</p>
        )}
      </Panel>

      {releases.length === 0 ? (
        <p className="text-sm text-ink-muted" data-testid="no-releases">
          Nothing has been released yet.
        </p>
      ) : (
        releases.map((r) => {
          const m = r.manifest;
          if (!m) return null;
          return (
            <Panel
              key={r.id}
              title={`${r.runId ? `Run ${m.runs[0]?.stem ?? r.runId}` : 'Study'} · version ${r.version}`}
              actions={
                <a
                  href={`/api/releases/${r.id}/archive`}
                  className="rounded bg-lumen px-3 py-1 text-sm font-medium text-ground hover:bg-lumen-strong"
                  data-testid={`download-release-${r.version}${r.runId ? `-run` : ''}`}
                >
                  Download ZIP
                </a>
              }
            >
              <div className="flex flex-col gap-3 text-sm" data-testid="release-entry">
                <p className="text-ink-muted">
                  Released {r.releasedAt.toISOString().replace('T', ' ').slice(0, 16)} UTC by {r.releasedByName}; {m.runs.length} runs,{' '}
                  {m.files.length} files; uncertain components {m.uncertainInExport === 'remove' ? 'removed' : 'kept'}.
                  {r.notes ? ` “${r.notes}”` : ''}{' '}
                  <Link href={`/studies/${studyId}/report?release=${r.id}`} className="text-lumen hover:text-lumen-strong">
                    Report for this release
                  </Link>
                </p>
                <table className="w-full text-xs">
                  <thead className="text-ink-faint">
                    <tr>
                      <th className="text-left font-medium">Run</th>
                      <th className="font-medium">k</th>
                      <th className="text-left font-medium">Noise list</th>
                      <th className="text-left font-medium">Denoised data</th>
                    </tr>
                  </thead>
                  <tbody>
                    {m.runs.map((run) => (
                      <tr key={run.runId} className="border-t border-line align-top">
                        <td className="py-1 font-mono">{run.stem}</td>
                        <td className="text-center font-mono">{run.k}</td>
                        <td className="font-mono" data-testid={`noise-${run.runId}`}>
                          {run.noise.join(',') || '—'}
                        </td>
                        <td>
                          <DenoiseControl runId={run.runId} releaseId={r.id} canRequest={mayDenoise} />
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
                <details>
                  <summary className="cursor-pointer text-ink-muted">Files and sha256 checksums</summary>
                  <table className="mt-2 w-full text-xs" data-testid="release-files">
                    <tbody>
                      {m.files.map((f) => (
                        <tr key={f.path} className="border-t border-line">
                          <td className="py-0.5">
                            <a href={`/api/releases/${r.id}/files/${f.name}`} className="font-mono hover:text-lumen">
                              {f.path}
                            </a>
                          </td>
                          <td className="text-right text-ink-faint">{kb(f.bytes)}</td>
                          <td className="pl-3 font-mono text-ink-faint">{f.sha256}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </details>
              </div>
            </Panel>
          );
        })
      )}
    </div>
  );
}
