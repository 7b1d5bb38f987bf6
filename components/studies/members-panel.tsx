'use client';

import { useState } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { memberSchema, type MemberInput } from '@/lib/studies/schema';
import { STUDY_ROLE_NAMES } from '@/lib/vocabulary/protocol';
import { ROLE_LABELS, STUDY_ROLES, mayHoldStudyRole, studyRoleRefusal, type Role, type StudyRole } from '@/lib/vocabulary/roles';
import { deleteJson, getJson, postJson } from '@/lib/api/client';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

type Member = { userId: number; name: string; email: string; role: string; studyRole: StudyRole };
type Candidate = { userId: number; name: string; email: string; role: Role; studyRole: StudyRole | null };

/**
 * Finds the facility's active accounts by name or e-mail (GET …/members/candidates, at most 20)
 * and hands the chosen one's e-mail to the add form. Each result says whether its account role can
 * hold the study role chosen in the form (the membership rule of lib/vocabulary/roles.ts).
 */
function AccountPicker({ studyId, studyRole, onPick }: { studyId: number; studyRole: StudyRole; onPick: (c: Candidate) => void }) {
  const [q, setQ] = useState('');
  const term = q.trim();
  const found = useQuery({
    queryKey: ['member-candidates', studyId, term],
    enabled: term.length >= 2,
    queryFn: async () => {
      const r = await getJson<{ accounts: Candidate[]; more: boolean }>(
        `/api/studies/${studyId}/members/candidates?q=${encodeURIComponent(term)}`,
      );
      if (!r.ok) throw new Error(r.message);
      return r.data;
    },
  });
  return (
    <div className="flex flex-col gap-1" data-testid="account-picker">
      <label htmlFor="member-search" className="text-sm text-ink-muted">
        Find an account (name or e-mail)
      </label>
      <input
        id="member-search"
        role="combobox"
        aria-expanded={Boolean(found.data && term.length >= 2)}
        aria-controls="member-search-results"
        className="rounded border border-line-strong bg-ground-sunken px-3 py-2 text-sm text-ink"
        value={q}
        maxLength={100}
        autoComplete="off"
        placeholder="e.g. Adeyemi"
        onChange={(e) => setQ(e.target.value)}
        data-testid="member-search"
      />
      {term.length >= 2 ? (
        <ul
          id="member-search-results"
          role="listbox"
          aria-label="Accounts found"
          className="max-h-64 overflow-y-auto rounded border border-line text-sm"
          data-testid="member-search-results"
        >
          {found.isError ? <li className="px-2 py-1 text-alarm">{(found.error as Error).message}</li> : null}
          {found.data?.accounts.length === 0 ? (
            <li className="px-2 py-1 text-ink-muted">
              No active account matches “{term}”. Invite the person instead (Facility → Invitations).
            </li>
          ) : null}
          {found.data?.accounts.map((c) => {
            const allowed = mayHoldStudyRole(c.role, studyRole);
            return (
              <li key={c.userId} role="option" aria-selected={false} aria-disabled={!allowed}>
                <button
                  type="button"
                  className="flex w-full flex-wrap items-baseline gap-2 px-2 py-1 text-left hover:bg-ground-sunken disabled:cursor-not-allowed disabled:opacity-60"
                  disabled={!allowed}
                  title={allowed ? undefined : studyRoleRefusal(c.role, studyRole)}
                  onClick={() => {
                    onPick(c);
                    setQ('');
                  }}
                  data-testid="member-candidate"
                >
                  <span className="font-medium">{c.name}</span>
                  <span className="text-ink-muted">{c.email}</span>
                  <span className="text-xs text-ink-faint">
                    {ROLE_LABELS[c.role]}
                    {c.studyRole ? ` · already ${STUDY_ROLE_NAMES[c.studyRole].toLowerCase()} here` : ''}
                    {allowed ? '' : ` · cannot be a study ${studyRole}`}
                  </span>
                </button>
              </li>
            );
          })}
          {found.data?.more ? (
            <li className="px-2 py-1 text-xs text-ink-muted">More accounts match; type more of the name or e-mail.</li>
          ) : null}
        </ul>
      ) : null}
    </div>
  );
}

/** The study's members with their study roles; leads find existing accounts by name or e-mail (or type the e-mail) to add them, and remove members. */
export function MembersPanel({ studyId, initial, canManage }: { studyId: number; initial: Member[]; canManage: boolean }) {
  const client = useQueryClient();
  const key = ['study-members', studyId];
  const [failure, setFailure] = useState<string | null>(null);
  const members = useQuery({
    queryKey: key,
    initialData: initial,
    queryFn: async () => {
      const r = await getJson<{ members: Member[] }>(`/api/studies/${studyId}/members`);
      if (!r.ok) throw new Error(r.message);
      return r.data.members;
    },
  });
  const { register, handleSubmit, formState, setError, reset, setValue, control } = useForm<MemberInput>({
    resolver: zodResolver(memberSchema),
    defaultValues: { email: '', studyRole: 'rater' },
  });
  const chosenRole = (useWatch({ control, name: 'studyRole' }) ?? 'rater') as StudyRole;
  const remove = useMutation({
    mutationFn: async (userId: number) => {
      const r = await deleteJson(`/api/studies/${studyId}/members/${userId}`);
      if (!r.ok) throw new Error(r.message);
    },
    onError: (e: Error) => setFailure(e.message),
    onSuccess: () => client.invalidateQueries({ queryKey: key }),
  });

  const onAdd = handleSubmit(async (values) => {
    setFailure(null);
    const r = await postJson(`/api/studies/${studyId}/members`, values);
    if (r.ok) {
      reset({ email: '', studyRole: values.studyRole });
      await client.invalidateQueries({ queryKey: key });
      return;
    }
    for (const [field, messages] of Object.entries(r.fields ?? {})) setError(field as keyof MemberInput, { message: messages[0] });
    if (!r.fields) setFailure(r.message);
  });

  return (
    <div className="flex flex-col gap-4">
      {failure ? <Notice kind="error">{failure}</Notice> : null}
      <table className="w-full text-sm" data-testid="members-table">
        <thead className="text-left text-ink-muted">
          <tr>
            <th className="py-1">Name</th>
            <th>E-mail</th>
            <th>Study role</th>
            <th />
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {members.data.map((m) => (
            <tr key={m.userId} data-testid="member-row">
              <td className="py-1">{m.name}</td>
              <td className="text-ink-muted">{m.email}</td>
              <td>{STUDY_ROLE_NAMES[m.studyRole]}</td>
              <td className="text-right">
                {canManage ? (
                  <Button
                    variant="quiet"
                    type="button"
                    onClick={() => remove.mutate(m.userId)}
                    disabled={remove.isPending}
                    aria-label={`Remove ${m.name}`}
                  >
                    Remove
                  </Button>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {canManage ? (
        <form onSubmit={onAdd} noValidate className="flex flex-wrap items-end gap-3" data-testid="member-form">
          <div className="w-full">
            <AccountPicker studyId={studyId} studyRole={chosenRole} onPick={(c) => setValue('email', c.email, { shouldValidate: true })} />
          </div>
          <div className="min-w-64 flex-1">
            <Field label="E-mail of an existing account" type="email" {...register('email')} error={formState.errors.email?.message} />
          </div>
          <div className="flex flex-col gap-1">
            <label htmlFor="member-role" className="text-sm text-ink-muted">
              Study role
            </label>
            <select
              id="member-role"
              className="rounded border border-line-strong bg-ground-sunken px-3 py-2 text-sm"
              {...register('studyRole')}
            >
              {STUDY_ROLES.map((r) => (
                <option key={r} value={r}>
                  {STUDY_ROLE_NAMES[r]}
                </option>
              ))}
            </select>
            {formState.errors.studyRole ? <p className="text-xs text-alarm">{formState.errors.studyRole.message}</p> : null}
          </div>
          <Button type="submit" disabled={formState.isSubmitting}>
            Add member
          </Button>
        </form>
      ) : null}
    </div>
  );
}
