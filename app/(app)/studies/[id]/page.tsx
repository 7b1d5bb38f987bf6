import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { studyWithAccess } from '@/lib/studies/study-with-access';
import { studyProgress } from '@/lib/db/queries/runs';
import { listRunsForStudy } from '@/lib/runs/list-study-runs';
import { maxUploadBytes } from '@/lib/runs/schema';
import { CONSENSUS_NAMES, DIM_METHOD_NAMES } from '@/lib/vocabulary/protocol';
import { StudyClient } from './study-client';

export const metadata: Metadata = { title: 'Study' };

export default async function StudyPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('studies.read');
  const id = Number((await params).id);
  if (!Number.isInteger(id) || id <= 0) notFound();
  const access = await studyWithAccess({ user, studyId: id });
  if (!access) notFound();
  const { study } = access;
  const [runs, progress] = await Promise.all([
    listRunsForStudy({ user, studyId: id }),
    studyProgress({ user, studyId: id, seesAllRuns: access.seesAllRuns }),
  ]);
  return (
    <div className="flex flex-col gap-6">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1 className="text-xl font-semibold" data-testid="study-name">
            {study.name}
          </h1>
          {study.description ? <p className="max-w-3xl text-sm text-ink-muted">{study.description}</p> : null}
          <p className="mt-1 text-xs text-ink-faint">
            {study.ratersPerRun} rater{study.ratersPerRun === 1 ? '' : 's'} per run · {CONSENSUS_NAMES[study.consensusRule]} · blinding{' '}
            {study.blinding ? 'on' : 'off'} · drop {study.dropVolumes} volumes · {DIM_METHOD_NAMES[study.dimMethod]}
            {study.dimMethod === 'fixed'
              ? ` (${study.fixedComponents})`
              : study.dimMethod === 'variance'
                ? ` (${study.varianceFraction})`
                : ''}
          </p>
        </div>
        <nav className="flex gap-2 text-sm" aria-label="Study">
          {access.canManage ? (
            <Link
              href={`/studies/${id}/reconcile`}
              className="rounded border border-line-strong px-3 py-1.5 hover:bg-ground-raised"
              data-testid="study-reconcile-link"
            >
              Reconcile{progress.openDisagreements ? ` (${progress.openDisagreements})` : ''}
            </Link>
          ) : null}
          {access.canManage ? (
            <Link
              href={`/studies/${id}/calibration`}
              className="rounded border border-line-strong px-3 py-1.5 hover:bg-ground-raised"
              data-testid="study-calibration-link"
            >
              Calibration
            </Link>
          ) : null}
          {access.seesAllRuns ? (
            <Link href={`/studies/${id}/agreement`} className="rounded border border-line-strong px-3 py-1.5 hover:bg-ground-raised">
              Agreement
            </Link>
          ) : null}
          {access.seesAllRuns ? (
            <Link
              href={`/studies/${id}/releases`}
              className="rounded border border-line-strong px-3 py-1.5 hover:bg-ground-raised"
              data-testid="study-releases-link"
            >
              Releases
            </Link>
          ) : null}
          <Link
            href={`/studies/${id}/settings`}
            className="rounded border border-line-strong px-3 py-1.5 hover:bg-ground-raised"
            data-testid="study-settings-link"
          >
            {access.canManage ? 'Protocol and members' : 'Protocol'}
          </Link>
        </nav>
      </div>
      <StudyClient
        studyId={id}
        initial={{ runs, progress }}
        canManage={access.canManage}
        readOnlyOpen={access.seesAllRuns}
        maxBytes={maxUploadBytes()}
      />
    </div>
  );
}
