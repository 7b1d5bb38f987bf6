'use client';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

/** The lead's "Release" action: releases the study (or one run) and shows the server's refusal when decisions are incomplete. */
export function ReleaseAction({ studyId, refusal, pending }: { studyId: number; refusal: string | null; pending: number }) {
  const router = useRouter();
  const [notes, setNotes] = useState('');
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ kind: 'error' | 'ok'; text: string } | null>(null);

  async function release() {
    setBusy(true);
    setMessage(null);
    const res = await postJson<{ releaseId: number; version: number; files: number }>(`/api/studies/${studyId}/releases`, notes ? { notes } : {});
    setBusy(false);
    if (!res.ok) return setMessage({ kind: 'error', text: res.message });
    setMessage({ kind: 'ok', text: `Released as version ${res.data.version} with ${res.data.files} files.` });
    setNotes('');
    router.refresh();
  }

  return (
    <div className="flex flex-col gap-3">
      {refusal ? (
        <Notice kind="info" testId="release-refusal">
          {refusal}{' '}
          {pending > 0 ? (
            <Link href={`/studies/${studyId}/reconcile`} className="text-lumen hover:text-lumen-strong">
              Open Reconcile
            </Link>
          ) : null}
        </Notice>
      ) : null}
      <label className="flex flex-col gap-1 text-sm" htmlFor="release-notes">
        <span className="text-ink-muted">Notes for this release (optional)</span>
        <input id="release-notes" value={notes} onChange={(e) => setNotes(e.target.value)} maxLength={2000} className="rounded border border-line-strong bg-ground-sunken px-2 py-1" />
      </label>
      <div>
        <Button onClick={release} disabled={busy} data-testid="release-button">
          {busy ? 'Releasing…' : 'Release the study'}
        </Button>
      </div>
      {message ? <Notice kind={message.kind} testId="release-message">{message.text}</Notice> : null}
    </div>
  );
}
