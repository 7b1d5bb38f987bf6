'use client';

import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { useForm, useWatch } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { inviteSchema, type InviteInput } from '@/lib/invitations/schema';
import { postJson } from '@/lib/api/client';
import { ROLE_LABELS, type Role } from '@/lib/vocabulary/roles';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

function SelectField({
  label,
  name,
  error,
  children,
  ...props
}: React.SelectHTMLAttributes<HTMLSelectElement> & { label: string; name: string; error?: string }) {
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
export function InviteForm({
  roles,
  studies,
  studyRoles,
}: {
  roles: Role[];
  studies: { id: number; name: string }[];
  studyRoles: string[];
}) {
  const router = useRouter();
  const [result, setResult] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  // a pending invitation to the same address: the server's words, and the values to send again on "Replace it"
  const [replace, setReplace] = useState<{ text: string; values: InviteInput } | null>(null);
  const defaults = { email: '', role: roles.includes('rater') ? 'rater' : roles[0], studyId: '', studyRole: '' } as unknown as InviteInput;
  const { register, handleSubmit, formState, reset, setError, control } = useForm<InviteInput>({
    resolver: zodResolver(inviteSchema),
    defaultValues: defaults,
  });
  const studyId = useWatch({ control, name: 'studyId' });

  const send = async (values: InviteInput) => {
    setResult(null);
    setReplace(null);
    const res = await postJson<{ ok: true; outcome: string; message: string }>('/api/invitations', values);
    if (res.ok) {
      setResult({ kind: 'ok', text: res.data.message });
      reset(defaults); // every field back to its default after each send, the role picker too
      router.refresh();
      return;
    }
    if (res.status === 409 && res.fields?.replace) {
      setReplace({ text: res.message, values });
      return;
    }
    for (const [name, messages] of Object.entries(res.fields ?? {})) {
      if (name === 'email' || name === 'role' || name === 'studyId' || name === 'studyRole') setError(name, { message: messages[0] });
    }
    setResult({ kind: 'error', text: res.message });
  };
  const onSubmit = handleSubmit((values) => send({ ...values, replace: false }));

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" data-testid="invite-form">
      {result ? (
        <Notice kind={result.kind} testId={result.kind === 'ok' ? 'invite-sent' : 'invite-error'}>
          {result.text}
        </Notice>
      ) : null}
      {replace ? (
        <div
          role="alertdialog"
          aria-labelledby="replace-title"
          className="rounded border border-alarm/60 bg-alarm/10 p-3 text-sm"
          data-testid="invite-replace"
        >
          <p id="replace-title" className="font-semibold">
            Replace the pending invitation?
          </p>
          <p className="mt-1 text-ink-muted" data-testid="invite-replace-text">
            {replace.text}
          </p>
          <p className="mt-1 text-ink-muted">The withdrawal is recorded in the audit log; the old link stops working.</p>
          <div className="mt-2 flex gap-2">
            <Button
              type="button"
              variant="danger"
              disabled={formState.isSubmitting}
              data-testid="invite-replace-yes"
              onClick={() => void send({ ...replace.values, replace: true })}
            >
              Withdraw it and send this one
            </Button>
            <Button
              type="button"
              variant="quiet"
              data-testid="invite-replace-no"
              onClick={() => {
                setReplace(null);
                setResult({ kind: 'ok', text: 'Nothing was sent; the pending invitation stays as it was.' });
              }}
            >
              Keep the pending one
            </Button>
          </div>
        </div>
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
