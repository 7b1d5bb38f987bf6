'use client';

import { useState } from 'react';
import Link from 'next/link';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { resetFormSchema, type ResetFormInput } from '@/app/api/password-reset/schema';
import { postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { NewPasswordFields } from '@/components/ui/new-password-fields';
import { Notice } from '@/components/ui/notice';

export function ResetPasswordForm({ token, email }: { token: string; email: string }) {
  const [failure, setFailure] = useState<string | null>(null);
  const [done, setDone] = useState(false);
  const { register, handleSubmit, formState, setError } = useForm<ResetFormInput>({ resolver: zodResolver(resetFormSchema) });

  const onSubmit = handleSubmit(async (values) => {
    setFailure(null);
    const result = await postJson<{ ok: true }>('/api/password-reset/complete', { ...values, token });
    if (result.ok) return setDone(true);
    for (const [name, messages] of Object.entries(result.fields ?? {})) {
      if (name === 'password' || name === 'confirmPassword') setError(name, { message: messages[0] });
    }
    setFailure(result.message);
  });

  if (done) {
    return (
      <div className="flex flex-col gap-4 rounded-lg border border-line bg-ground-raised p-6" data-testid="reset-done">
        <h1 className="text-lg font-semibold">Password changed</h1>
        <Notice kind="ok">Sign in as {email} with your new password.</Notice>
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
      data-testid="reset-form"
    >
      <div>
        <h1 className="text-lg font-semibold">Choose a new password</h1>
        <p className="mt-1 text-sm text-ink-muted">For {email}.</p>
      </div>
      {failure ? (
        <Notice kind="error" testId="reset-error">
          {failure}
        </Notice>
      ) : null}
      <NewPasswordFields
        label="New password"
        password={{ field: register('password'), error: formState.errors.password?.message }}
        confirm={{ field: register('confirmPassword'), error: formState.errors.confirmPassword?.message }}
      />
      <Button type="submit" disabled={formState.isSubmitting} data-testid="reset-submit">
        {formState.isSubmitting ? 'Saving…' : 'Save the new password'}
      </Button>
    </form>
  );
}
