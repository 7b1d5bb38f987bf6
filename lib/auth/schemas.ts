import { z } from 'zod';

export const emailSchema = z.string().trim().toLowerCase().max(255, { message: 'Use at most 255 characters.' }).pipe(z.email({ message: 'Enter a valid e-mail address.' }));

export const passwordSchema = z
  .string()
  .min(10, { message: 'Use at least 10 characters.' })
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
