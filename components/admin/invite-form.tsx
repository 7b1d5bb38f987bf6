'use client';

import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { useForm, useWatch } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { inviteSchema, type InviteInput } from '@/lib/invitations/schema';
import { postJson } from '@/lib/api/client';
import { ROLE_LABELS, type Role } from '@/lib/auth/roles';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

function SelectField({ label, name, error, children, ...props }: React.SelectHTMLAttributes<HTMLSelectElement> & { label: string; name: string; error?: string }) {
  const id = `field-${name}`;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm text-ink-muted">
        {label}
      </label>
      <select
        id={id}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className={`rounded border bg-ground-sunken px-3 py-2 text-sm text-ink ${error ? 'border-alarm' : 'border-line-strong'}`}
        {...props}
      >
        {children}
      </select>
      {error ? (
        <p id={`${id}-error`} className="text-xs text-alarm" data-testid={`${name}-error`}>
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** Invite a person by e-mail with a role (and optionally a study). Leads see only rater and observer. */
export function InviteForm({ roles, studies, studyRoles }: { roles: Role[]; studies: { id: number; name: string }[]; studyRoles: string[] }) {
  const router = useRouter();
  const [result, setResult] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const { register, handleSubmit, formState, reset, setError, control } = useForm<InviteInput>({
    resolver: zodResolver(inviteSchema),
    defaultValues: { role: roles.includes('rater') ? 'rater' : roles[0], studyId: '', studyRole: '' } as unknown as InviteInput,
  });
  const studyId = useWatch({ control, name: 'studyId' });

  const onSubmit = handleSubmit(async (values) => {
    setResult(null);
    const res = await postJson<{ ok: true; message: string }>('/api/invitations', values);
    if (res.ok) {
      setResult({ kind: 'ok', text: res.data.message });
      reset();
      router.refresh();
      return;
    }
    for (const [name, messages] of Object.entries(res.fields ?? {})) {
      if (name === 'email' || name === 'role' || name === 'studyId' || name === 'studyRole') setError(name, { message: messages[0] });
    }
    setResult({ kind: 'error', text: res.message });
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" data-testid="invite-form">
      {result ? (
        <Notice kind={result.kind} testId={result.kind === 'ok' ? 'invite-sent' : 'invite-error'}>
          {result.text}
        </Notice>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="E-mail" type="email" autoComplete="off" {...register('email')} error={formState.errors.email?.message} />
        <SelectField label="Role" {...register('role')} error={formState.errors.role?.message}>
          {roles.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Study (optional)" {...register('studyId')} error={formState.errors.studyId?.message}>
          <option value="">No study</option>
          {studies.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
        </SelectField>
        <SelectField label="Role in the study" disabled={!studyId} {...register('studyRole')} error={formState.errors.studyRole?.message}>
          <option value="">—</option>
          {studyRoles.map((r) => (
            <option key={r} value={r}>
              {r}
            </option>
          ))}
        </SelectField>
      </div>
      <div>
        <Button type="submit" disabled={formState.isSubmitting} data-testid="invite-submit">
          {formState.isSubmitting ? 'Sending…' : 'Send the invitation'}
        </Button>
      </div>
    </form>
  );
}
