'use client';

import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { changePasswordSchema, type ChangePasswordInput } from '@/lib/auth/schemas';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { NewPasswordFields } from '@/components/ui/new-password-fields';
import { Notice } from '@/components/ui/notice';
import { postJson } from '@/lib/api/client';

export function ChangePasswordForm() {
  const [done, setDone] = useState(false);
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError, reset } = useForm<ChangePasswordInput>({
    resolver: zodResolver(changePasswordSchema),
  });

  const onSubmit = handleSubmit(async (values) => {
    setDone(false);
    setFailure(null);
    const result = await postJson('/api/account/password', values);
    if (result.ok) {
      setDone(true);
      reset();
      return;
    }
    for (const [field, messages] of Object.entries(result.fields ?? {})) {
      setError(field as keyof ChangePasswordInput, { message: messages[0] });
    }
    if (!result.fields) setFailure(result.message);
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex max-w-sm flex-col gap-3" data-testid="change-password-form">
      {done ? <Notice kind="ok">Your password was changed.</Notice> : null}
      {failure ? <Notice kind="error">{failure}</Notice> : null}
      <Field
        label="Current password"
        type="password"
        autoComplete="current-password"
        {...register('currentPassword')}
        error={formState.errors.currentPassword?.message}
      />
      <NewPasswordFields
        label="New password"
        password={{ field: register('newPassword'), error: formState.errors.newPassword?.message }}
        confirm={{ field: register('confirmPassword'), error: formState.errors.confirmPassword?.message }}
      />
      <Button type="submit" disabled={formState.isSubmitting}>
        Change password
      </Button>
    </form>
  );
}
