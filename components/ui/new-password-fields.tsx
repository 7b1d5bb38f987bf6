'use client';

import type { UseFormRegisterReturn } from 'react-hook-form';
import { MIN_PASSWORD_LENGTH } from '@/lib/auth/schemas';
import { Field } from './field';

type Registered = { field: UseFormRegisterReturn; error?: string };

/**
 * A new password and its repetition, as the change-password, accept-invitation and reset forms ask
 * for it: browsers offer to generate one (autocomplete new-password), and the hint states the rule.
 */
export function NewPasswordFields({ password, confirm, label }: { password: Registered; confirm: Registered; label: string }) {
  return (
    <>
      <Field
        label={label}
        type="password"
        autoComplete="new-password"
        hint={`At least ${MIN_PASSWORD_LENGTH} characters.`}
        {...password.field}
        error={password.error}
      />
      <Field label={`${label} again`} type="password" autoComplete="new-password" {...confirm.field} error={confirm.error} />
    </>
  );
}
