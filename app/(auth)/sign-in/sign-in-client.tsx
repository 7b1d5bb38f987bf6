'use client';

import Link from 'next/link';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { signIn } from 'next-auth/react';
import { signInSchema } from '@/lib/auth/schemas';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import type { z } from 'zod';

type SignInValues = z.input<typeof signInSchema>;

export function SignInForm() {
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<SignInValues>({ resolver: zodResolver(signInSchema) });

  const onSubmit = handleSubmit(async (values) => {
    setFailure(null);
    const result = await signIn('credentials', { ...values, redirect: false });
    if (!result || result.error) {
      setFailure(result?.error && result.error !== 'CredentialsSignin' ? result.error : 'E-mail or password is wrong.');
      return;
    }
    // eslint-disable-next-line @next/next/no-location-assign-relative-destination -- a full load so that the server components see the new session cookie
    window.location.assign('/');
  });

  return (
    <form
      onSubmit={onSubmit}
      noValidate
      className="flex flex-col gap-4 rounded-lg border border-line bg-ground-raised p-6"
      data-testid="sign-in-form"
    >
      <h1 className="text-lg font-semibold">Sign in</h1>
      {failure ? (
        <Notice kind="error" testId="sign-in-error">
          {failure}
        </Notice>
      ) : null}
      <Field label="E-mail" type="email" autoComplete="username" {...register('email')} error={formState.errors.email?.message} />
      <Field
        label="Password"
        type="password"
        autoComplete="current-password"
        {...register('password')}
        error={formState.errors.password?.message}
      />
      <Button type="submit" disabled={formState.isSubmitting} data-testid="sign-in-submit">
        {formState.isSubmitting ? 'Signing in…' : 'Sign in'}
      </Button>
      <Link href="/forgot-password" className="text-center text-sm text-ink-muted hover:text-ink" data-testid="forgot-password-link">
        Forgot your password?
      </Link>
    </form>
  );
}
