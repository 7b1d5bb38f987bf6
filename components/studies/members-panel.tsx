'use client';

import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { memberSchema, type MemberInput } from '@/lib/studies/schema';
import { STUDY_ROLE_NAMES, STUDY_ROLES, type StudyRole } from '@/lib/studies/labels';
import { deleteJson, getJson, postJson } from '@/lib/api/client';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

type Member = { userId: number; name: string; email: string; role: string; studyRole: StudyRole };

/** The study's members with their study roles; leads add existing accounts by e-mail and remove members. */
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
  const { register, handleSubmit, formState, setError, reset } = useForm<MemberInput>({ resolver: zodResolver(memberSchema), defaultValues: { email: '', studyRole: 'rater' } });
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
          <tr><th className="py-1">Name</th><th>E-mail</th><th>Study role</th><th /></tr>
        </thead>
        <tbody className="divide-y divide-line">
          {members.data.map((m) => (
            <tr key={m.userId} data-testid="member-row">
              <td className="py-1">{m.name}</td>
              <td className="text-ink-muted">{m.email}</td>
              <td>{STUDY_ROLE_NAMES[m.studyRole]}</td>
              <td className="text-right">
                {canManage ? (
                  <Button variant="quiet" type="button" onClick={() => remove.mutate(m.userId)} disabled={remove.isPending} aria-label={`Remove ${m.name}`}>
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
          <div className="min-w-64 flex-1">
            <Field label="E-mail of an existing account" type="email" {...register('email')} error={formState.errors.email?.message} />
          </div>
          <div className="flex flex-col gap-1">
            <label htmlFor="member-role" className="text-sm text-ink-muted">Study role</label>
            <select id="member-role" className="rounded border border-line-strong bg-ground-sunken px-3 py-2 text-sm" {...register('studyRole')}>
              {STUDY_ROLES.map((r) => (
                <option key={r} value={r}>{STUDY_ROLE_NAMES[r]}</option>
              ))}
            </select>
            {formState.errors.studyRole ? <p className="text-xs text-alarm">{formState.errors.studyRole.message}</p> : null}
          </div>
          <Button type="submit" disabled={formState.isSubmitting}>Add member</Button>
        </form>
      ) : null}
    </div>
  );
}
