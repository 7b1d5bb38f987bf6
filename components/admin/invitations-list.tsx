'use client';

import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { deleteJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { utcMinute } from './format';

export type InvitationView = {
  id: number;
  email: string;
  role: string | null;
  studyName: string | null;
  studyRole: string | null;
  inviterName: string | null;
  state: 'valid' | 'used' | 'expired' | 'revoked' | 'unknown';
  createdAt: string;
  expiresAt: string;
  usedAt: string | null;
};

const STATE_LABEL: Record<InvitationView['state'], string> = {
  valid: 'waiting',
  used: 'accepted',
  expired: 'expired',
  revoked: 'withdrawn',
  unknown: '—',
};

/** Sent invitations with their state; waiting ones can be withdrawn. */
export function InvitationsList({ invitations }: { invitations: InvitationView[] }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  if (invitations.length === 0) return <p className="text-sm text-ink-muted">No invitations yet.</p>;
  async function revoke(id: number) {
    setError(null);
    const res = await deleteJson(`/api/invitations/${id}`);
    if (!res.ok) setError(res.message);
    router.refresh();
  }
  return (
    <div className="flex flex-col gap-2">
      {error ? <Notice kind="error">{error}</Notice> : null}
      <table className="w-full text-left text-sm" data-testid="invitations-table">
        <thead className="text-xs text-ink-faint">
          <tr>
            <th className="py-1 font-medium">E-mail</th>
            <th className="py-1 font-medium">Role</th>
            <th className="py-1 font-medium">Study</th>
            <th className="py-1 font-medium">Invited by</th>
            <th className="py-1 font-medium">Sent (UTC)</th>
            <th className="py-1 font-medium">State</th>
            <th className="py-1 font-medium" />
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {invitations.map((i) => (
            <tr key={i.id} data-testid={`invitation-${i.email}`}>
              <td className="py-1.5">{i.email}</td>
              <td className="py-1.5">{i.role}</td>
              <td className="py-1.5 text-ink-muted">{i.studyName ? `${i.studyName} (${i.studyRole})` : '—'}</td>
              <td className="py-1.5 text-ink-muted">{i.inviterName ?? '—'}</td>
              <td className="py-1.5 tabular-nums text-ink-muted">{utcMinute(i.createdAt)}</td>
              <td className="py-1.5">
                {STATE_LABEL[i.state]}
                {i.state === 'valid' ? <span className="text-ink-faint"> · until {utcMinute(i.expiresAt)}</span> : null}
              </td>
              <td className="py-1.5 text-right">
                {i.state === 'valid' ? (
                  <Button variant="quiet" onClick={() => revoke(i.id)} data-testid={`revoke-${i.email}`}>
                    Withdraw
                  </Button>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
