'use client';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { getJson, postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';

/**
 * The lead's "Release" action: asks for a release of the study (or one run), shows the server's
 * refusal when decisions are incomplete, then follows the release job the worker runs (stage and
 * percent) until the release is there.
 */
export type ReleasableRun = { runId: number; name: string; components: number; waiting: number };

type ReleaseJob = {
  jobId: number;
  status: string;
  stage: string | null;
  percent: number | null;
  message: string | null;
  release: { releaseId: number; version: number; files: number } | null;
};

const STAGES: Record<string, string> = {
  queued: 'waiting for a worker',
  checking: 'checking the decisions',
  checksums: 'checking the component maps',
  statistics: 'computing the agreement statistics',
  writing: 'writing the files',
};

export function ReleaseAction({
  studyId,
  studyName,
  refusal,
  pending,
  runs,
  studyRuns,
  studyComponents,
  buildingJobId = null,
}: {
  studyId: number;
  studyName: string;
  refusal: string | null;
  pending: number;
  runs: ReleasableRun[];
  studyRuns: number;
  studyComponents: number;
  buildingJobId?: number | null;
}) {
  const router = useRouter();
  const [notes, setNotes] = useState('');
  const [runId, setRunId] = useState('');
  const [busy, setBusy] = useState(false);
  const [confirming, setConfirming] = useState(false);
  const [message, setMessage] = useState<{ kind: 'error' | 'ok'; text: string } | null>(null);
  const [jobId, setJobId] = useState<number | null>(buildingJobId);
  const job = useQuery({
    queryKey: ['release-job', studyId, jobId],
    enabled: jobId != null,
    queryFn: async () => {
      const r = await getJson<ReleaseJob>(`/api/studies/${studyId}/releases/jobs/${jobId}`);
      if (!r.ok) throw new Error(r.message);
      // the list of releases below is the server's: fetch it again once this one is there
      if (r.data.status === 'succeeded') router.refresh();
      return r.data;
    },
    refetchInterval: (q) => (!q.state.data || q.state.data.status === 'queued' || q.state.data.status === 'running' ? 1000 : false),
  });
  const done =
    jobId != null && job.data && job.data.jobId === jobId && ['succeeded', 'failed', 'cancelled'].includes(job.data.status)
      ? job.data
      : null;
  const building = jobId != null && !done;
  const progress = building && job.data ? job.data : null;
  const shown: { kind: 'error' | 'ok'; text: string } | null =
    message ??
    (done
      ? done.status === 'succeeded' && done.release
        ? { kind: 'ok', text: `Released as version ${done.release.version} with ${done.release.files} files.` }
        : { kind: 'error', text: `The release was not made: ${done.message ?? 'it was stopped before it finished'}` }
      : null);

  const chosen = runs.find((r) => String(r.runId) === runId);
  const scope = chosen
    ? { what: `the run ${chosen.name}`, count: `its ${chosen.components} component${chosen.components === 1 ? '' : 's'}` }
    : {
        what: `the study ${studyName}`,
        count: `${studyRuns} run${studyRuns === 1 ? '' : 's'} with ${studyComponents} component${studyComponents === 1 ? '' : 's'}`,
      };

  async function release() {
    setConfirming(false);
    setBusy(true);
    setMessage(null);
    setJobId(null);
    const res = await postJson<{ jobId: number; existing: boolean }>(`/api/studies/${studyId}/releases`, {
      ...(notes ? { notes } : {}),
      ...(runId ? { runId: Number(runId) } : {}),
    });
    setBusy(false);
    if (!res.ok) return setMessage({ kind: 'error', text: res.message });
    setJobId(res.data.jobId);
    setNotes('');
  }

  return (
    <div className="flex flex-col gap-3">
      {refusal && !runId ? (
        <Notice kind="info" testId="release-refusal">
          {refusal}{' '}
          {pending > 0 ? (
            <Link href={`/studies/${studyId}/reconcile`} className="text-lumen hover:text-lumen-strong">
              Open Reconcile
            </Link>
          ) : null}
        </Notice>
      ) : null}
      <label className="flex flex-col gap-1 text-sm" htmlFor="release-scope">
        <span className="text-ink-muted">What to release</span>
        <select
          id="release-scope"
          value={runId}
          onChange={(e) => setRunId(e.target.value)}
          className="rounded border border-line-strong bg-ground-sunken px-2 py-1"
          data-testid="release-scope"
        >
          <option value="">The whole study</option>
          {runs.map((r) => (
            <option key={r.runId} value={r.runId}>
              {r.name} only ({r.waiting ? `${r.waiting} of ${r.components} waiting` : `${r.components} components decided`})
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col gap-1 text-sm" htmlFor="release-notes">
        <span className="text-ink-muted">Notes for this release (optional)</span>
        <input
          id="release-notes"
          value={notes}
          onChange={(e) => setNotes(e.target.value)}
          maxLength={2000}
          className="rounded border border-line-strong bg-ground-sunken px-2 py-1"
        />
      </label>
      <div>
        <Button onClick={() => setConfirming(true)} disabled={busy || building} data-testid="release-button">
          {busy || building ? 'Releasing…' : runId ? 'Release this run' : 'Release the study'}
        </Button>
      </div>
      {building ? (
        <Notice kind="info" testId="release-progress">
          Building the release:{' '}
          {progress ? (STAGES[progress.stage ?? ''] ?? progress.stage ?? 'waiting for a worker') : 'waiting for a worker'}
          {progress?.percent != null && progress.status === 'running' ? ` (${Math.round(progress.percent)} %)` : ''}. The page shows it when
          it is ready.
        </Notice>
      ) : null}
      {shown ? (
        <Notice kind={shown.kind} testId="release-message">
          {shown.text}
        </Notice>
      ) : null}
      <ConfirmDialog
        open={confirming}
        title={chosen ? 'Release this run?' : 'Release the study?'}
        confirmLabel={chosen ? 'Release the run' : 'Release the study'}
        onConfirm={release}
        onCancel={() => setConfirming(false)}
        testId="release-confirm"
      >
        <p>
          You are releasing {scope.what}: {scope.count}, as the next version.
        </p>
        <p>
          Every vote on the released runs is frozen: raters can no longer change them, and the release&apos;s noise lists, tables and report
          never change. Pipelines asking for the latest release get this version.
        </p>
        <p className="text-ink">This cannot be undone. A later correction needs a new release.</p>
      </ConfirmDialog>
    </div>
  );
}
