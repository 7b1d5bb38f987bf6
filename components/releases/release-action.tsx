'use client';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';

/** The lead's "Release" action: releases the study (or one run) and shows the server's refusal when decisions are incomplete. */
export type ReleasableRun = { runId: number; name: string; components: number; waiting: number };

export function ReleaseAction({ studyId, studyName, refusal, pending, runs, studyRuns, studyComponents }: { studyId: number; studyName: string; refusal: string | null; pending: number; runs: ReleasableRun[]; studyRuns: number; studyComponents: number }) {
  const router = useRouter();
  const [notes, setNotes] = useState('');
  const [runId, setRunId] = useState('');
  const [busy, setBusy] = useState(false);
  const [confirming, setConfirming] = useState(false);
  const [message, setMessage] = useState<{ kind: 'error' | 'ok'; text: string } | null>(null);

  const chosen = runs.find((r) => String(r.runId) === runId);
  const scope = chosen
    ? { what: `the run ${chosen.name}`, count: `its ${chosen.components} component${chosen.components === 1 ? '' : 's'}` }
    : { what: `the study ${studyName}`, count: `${studyRuns} run${studyRuns === 1 ? '' : 's'} with ${studyComponents} component${studyComponents === 1 ? '' : 's'}` };

  async function release() {
    setConfirming(false);
    setBusy(true);
    setMessage(null);
    const res = await postJson<{ releaseId: number; version: number; files: number }>(`/api/studies/${studyId}/releases`, { ...(notes ? { notes } : {}), ...(runId ? { runId: Number(runId) } : {}) });
    setBusy(false);
    if (!res.ok) return setMessage({ kind: 'error', text: res.message });
    setMessage({ kind: 'ok', text: `Released as version ${res.data.version} with ${res.data.files} files.` });
    setNotes('');
    router.refresh();
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
        <select id="release-scope" value={runId} onChange={(e) => setRunId(e.target.value)} className="rounded border border-line-strong bg-ground-sunken px-2 py-1" data-testid="release-scope">
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
        <input id="release-notes" value={notes} onChange={(e) => setNotes(e.target.value)} maxLength={2000} className="rounded border border-line-strong bg-ground-sunken px-2 py-1" />
      </label>
      <div>
        <Button onClick={() => setConfirming(true)} disabled={busy} data-testid="release-button">
          {busy ? 'Releasing…' : runId ? 'Release this run' : 'Release the study'}
        </Button>
      </div>
      {message ? <Notice kind={message.kind} testId="release-message">{message.text}</Notice> : null}
      <ConfirmDialog
        open={confirming}
        title={chosen ? 'Release this run?' : 'Release the study?'}
        confirmLabel={chosen ? 'Release the run' : 'Release the study'}
        onConfirm={release}
        onCancel={() => setConfirming(false)}
        testId="release-confirm"
      >
        <p>You are releasing {scope.what}: {scope.count}, as the next version.</p>
        <p>
          Every vote on the released runs is frozen: raters can no longer change them, and the release&apos;s noise lists, tables and report
          never change. Pipelines asking for the latest release get this version.
        </p>
        <p className="text-ink">This cannot be undone. A later correction needs a new release.</p>
      </ConfirmDialog>
    </div>
  );
}
