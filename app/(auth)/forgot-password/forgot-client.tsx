'use client';

import { useState } from 'react';
import Link from 'next/link';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { resetRequestSchema, type ResetRequestInput } from '@/app/api/password-reset/schema';
import { postJson } from '@/lib/api/client';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

export function ForgotPasswordForm() {
  const [failure, setFailure] = useState<string | null>(null);
  const [sent, setSent] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<ResetRequestInput>({ resolver: zodResolver(resetRequestSchema) });

  const onSubmit = handleSubmit(async (values) => {
    setFailure(null);
    const result = await postJson<{ ok: true; message: string }>('/api/password-reset', values);
    if (result.ok) setSent(result.data.message);
    else setFailure(result.message);
  });

  return (
    <form
      onSubmit={onSubmit}
      noValidate
      className="flex flex-col gap-4 rounded-lg border border-line bg-ground-raised p-6"
      data-testid="forgot-form"
    >
      <div>
        <h1 className="text-lg font-semibold">Forgot your password?</h1>
        <p className="mt-1 text-sm text-ink-muted">Enter the address you sign in with; we send a link to choose a new password.</p>
      </div>
      {sent ? (
        <Notice kind="ok" testId="forgot-sent">
          {sent}
        </Notice>
      ) : null}
      {failure ? (
        <Notice kind="error" testId="forgot-error">
          {failure}
        </Notice>
      ) : null}
      <Field label="E-mail" type="email" autoComplete="username" {...register('email')} error={formState.errors.email?.message} />
      <Button type="submit" disabled={formState.isSubmitting} data-testid="forgot-submit">
        {formState.isSubmitting ? 'Sending…' : 'Send the link'}
      </Button>
      <Link href="/sign-in" className="text-sm text-lumen hover:text-lumen-strong">
        Back to sign-in
      </Link>
    </form>
  );
}
