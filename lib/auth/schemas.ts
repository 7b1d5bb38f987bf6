import { z } from 'zod';

/** An e-mail address: at most 254 characters (RFC 5321 §4.5.3.1 path limit), trimmed and lower-cased. */
export const emailSchema = z
  .string()
  .trim()
  .max(254, { message: 'An e-mail address has at most 254 characters' })
  .toLowerCase()
  .pipe(z.email({ message: 'Enter a valid e-mail address.' }));

/** The shortest password an account may have (the forms' hint says it). */
export const MIN_PASSWORD_LENGTH = 10;

export const passwordSchema = z
  .string()
  .min(MIN_PASSWORD_LENGTH, { message: `Use at least ${MIN_PASSWORD_LENGTH} characters.` })
  .max(200, { message: 'Use at most 200 characters.' });

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, { message: 'Enter your password.' }).max(200, { message: 'That password is too long.' }),
});

export const changePasswordSchema = z
  .object({
    currentPassword: z.string().min(1, { message: 'Enter your current password.' }).max(200, { message: 'That password is too long.' }),
    newPassword: passwordSchema,
    confirmPassword: z.string().max(200),
  })
  .refine((v) => v.newPassword === v.confirmPassword, {
    path: ['confirmPassword'],
    message: 'The two new passwords differ.',
  });
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>;
