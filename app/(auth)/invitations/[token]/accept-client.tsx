'use client';

import { useState } from 'react';
import Link from 'next/link';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { acceptFormSchema, type AcceptFormInput } from '@/lib/invitations/schema';
import { postJson } from '@/lib/api/client';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { NewPasswordFields } from '@/components/ui/new-password-fields';
import { Notice } from '@/components/ui/notice';

export function AcceptInvitationForm({
  token,
  email,
  roleLabel,
  studyName,
  inviterName,
}: {
  token: string;
  email: string;
  roleLabel: string;
  studyName: string | null;
  inviterName: string | null;
}) {
  const [failure, setFailure] = useState<string | null>(null);
  const [done, setDone] = useState(false);
  const { register, handleSubmit, formState, setError } = useForm<AcceptFormInput>({ resolver: zodResolver(acceptFormSchema) });

  const onSubmit = handleSubmit(async (values) => {
    setFailure(null);
    const result = await postJson<{ ok: true; email: string }>('/api/invitations/accept', { ...values, token });
    if (result.ok) return setDone(true);
    for (const [name, messages] of Object.entries(result.fields ?? {})) {
      if (name === 'name' || name === 'password' || name === 'confirmPassword') setError(name, { message: messages[0] });
    }
    setFailure(result.message);
  });

  if (done) {
    return (
      <div className="flex flex-col gap-4 rounded-lg border border-line bg-ground-raised p-6" data-testid="invitation-accepted">
        <h1 className="text-lg font-semibold">Your account is ready</h1>
        <Notice kind="ok">You can now sign in as {email} with the password you chose.</Notice>
        <Link href="/sign-in" className="text-sm text-lumen hover:text-lumen-strong" data-testid="go-sign-in">
          Sign in
        </Link>
      </div>
    );
  }

  return (
    <form
      onSubmit={onSubmit}
      noValidate
      className="flex flex-col gap-4 rounded-lg border border-line bg-ground-raised p-6"
      data-testid="accept-form"
    >
      <div>
        <h1 className="text-lg font-semibold">Join Quorum</h1>
        <p className="mt-1 text-sm text-ink-muted">
          {inviterName ? `${inviterName} invited ` : 'You are invited as '}
          <span className="text-ink">{email}</span>
          {inviterName ? ' as ' : ' '}
          <span className="text-ink">{roleLabel.toLowerCase()}</span>
          {studyName ? (
            <>
              {' '}
              in <span className="text-ink">{studyName}</span>
            </>
          ) : null}
          .
        </p>
      </div>
      {failure ? (
        <Notice kind="error" testId="accept-error">
          {failure}
        </Notice>
      ) : null}
      <Field label="Your name" autoComplete="name" {...register('name')} error={formState.errors.name?.message} />
      <NewPasswordFields
        label="Password"
        password={{ field: register('password'), error: formState.errors.password?.message }}
        confirm={{ field: register('confirmPassword'), error: formState.errors.confirmPassword?.message }}
      />
      <Button type="submit" disabled={formState.isSubmitting} data-testid="accept-submit">
        {formState.isSubmitting ? 'Creating your account…' : 'Create my account'}
      </Button>
    </form>
  );
}
