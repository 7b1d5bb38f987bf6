'use client';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { deleteJson, getJson, postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';

type Token = {
  id: number;
  name: string;
  tokenPrefix: string | null;
  scope: string;
  lastUsedAt: string | null;
  expiresAt: string | null;
  revokedAt: string | null;
  createdAt: string;
};

const day = (s: string | null) => (s ? s.slice(0, 16).replace('T', ' ') : '—');

/** Personal access tokens for pipelines: create (shown once), list, revoke. */
export function AccessTokens() {
  const qc = useQueryClient();
  const [name, setName] = useState('');
  const [fresh, setFresh] = useState<string | null>(null);
  const [revoking, setRevoking] = useState<Token | null>(null);
  const tokens = useQuery({
    queryKey: ['access-tokens'],
    queryFn: async () => {
      const r = await getJson<{ tokens: Token[] }>('/api/account/tokens');
      if (!r.ok) throw new Error(r.message);
      return r.data.tokens;
    },
  });
  const create = useMutation({
    mutationFn: async () => {
      const r = await postJson<{ token: string }>('/api/account/tokens', { name });
      if (!r.ok) throw new Error(r.fields?.name?.[0] ?? r.message);
      return r.data;
    },
    onSuccess: (d) => {
      setFresh(d.token);
      setName('');
      void qc.invalidateQueries({ queryKey: ['access-tokens'] });
    },
  });
  const revoke = useMutation({
    mutationFn: async (id: number) => {
      const r = await deleteJson(`/api/account/tokens/${id}`);
      if (!r.ok) throw new Error(r.message);
    },
    onSuccess: () => {
      setRevoking(null);
      return qc.invalidateQueries({ queryKey: ['access-tokens'] });
    },
  });

  return (
    <div className="flex flex-col gap-3 text-sm" data-testid="access-tokens">
      <p className="text-ink-muted">
        A token lets a pipeline read released noise lists and files (read-only, scope <code>releases:read</code>). Send it as{' '}
        <code>Authorization: Bearer …</code>.
      </p>
      <form
        className="flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          create.mutate();
        }}
      >
        <label className="flex flex-col gap-1" htmlFor="token-name">
          <span className="text-ink-muted">Name</span>
          <input
            id="token-name"
            value={name}
            onChange={(e) => setName(e.target.value)}
            maxLength={120}
            aria-describedby="token-error"
            className="rounded border border-line-strong bg-ground-sunken px-2 py-1"
            placeholder="e.g. lab pipeline"
          />
        </label>
        <Button type="submit" disabled={create.isPending} data-testid="token-create">
          Create token
        </Button>
      </form>
      {create.error ? (
        <p id="token-error" className="text-alarm">
          {create.error.message}
        </p>
      ) : null}
      {fresh ? (
        <Notice kind="ok" testId="token-secret">
          Copy the token now; it is not shown again: <code className="break-all font-mono">{fresh}</code>
        </Notice>
      ) : null}
      <table className="w-full text-xs">
        <thead className="text-ink-faint">
          <tr>
            <th className="text-left font-medium">Name</th>
            <th className="text-left font-medium">Token</th>
            <th className="text-left font-medium">Created</th>
            <th className="text-left font-medium">Last used</th>
            <th />
          </tr>
        </thead>
        <tbody>
          {(tokens.data ?? []).map((t) => (
            <tr key={t.id} className="border-t border-line">
              <td className="py-1">{t.name}</td>
              <td className="font-mono">{t.tokenPrefix}…</td>
              <td>{day(t.createdAt)}</td>
              <td>{day(t.lastUsedAt)}</td>
              <td className="text-right">
                {t.revokedAt ? (
                  <span className="text-ink-faint">revoked</span>
                ) : (
                  <Button
                    variant="danger"
                    className="px-2 py-0.5 text-xs"
                    onClick={() => setRevoking(t)}
                    data-testid={`token-revoke-${t.id}`}
                  >
                    Revoke
                  </Button>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {revoke.error ? (
        <p className="text-alarm" role="alert">
          {revoke.error.message}
        </p>
      ) : null}
      <ConfirmDialog
        open={revoking !== null}
        title={`Revoke the token “${revoking?.name ?? ''}”?`}
        confirmLabel="Revoke the token"
        busy={revoke.isPending}
        onConfirm={() => revoking && revoke.mutate(revoking.id)}
        onCancel={() => setRevoking(null)}
        testId="token-revoke-confirm"
      >
        <p>
          Every pipeline that sends the token <code className="font-mono">{revoking?.tokenPrefix}…</code> is refused from now on (401) and
          can no longer fetch released noise lists.
        </p>
        <p className="text-ink">A revoked token cannot be restored: create a new one and give it to the pipeline.</p>
      </ConfirmDialog>
    </div>
  );
}
