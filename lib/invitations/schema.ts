import { z } from 'zod';
import { emailSchema, passwordSchema } from '@/lib/auth/schemas';
import { ROLES, STUDY_ROLES, mayHoldStudyRole, studyRoleRefusal } from '@/lib/vocabulary/roles';

/** An invitation: address, facility role, and optionally a study with the role in it. */
export const inviteSchema = z
  .object({
    email: emailSchema,
    role: z.enum(ROLES, { message: 'Choose a role.' }),
    studyId: z.preprocess((v) => (v === '' || v === null ? undefined : v), z.coerce.number().int().positive().optional()),
    studyRole: z.preprocess((v) => (v === '' || v === null ? undefined : v), z.enum(STUDY_ROLES).optional()),
    /** True when the inviter confirmed replacing a pending invitation to the same address. */
    replace: z.boolean().optional(),
  })
  .refine((v) => !v.studyId || v.studyRole, { path: ['studyRole'], message: 'Choose the role in the study.' })
  // the same rule as adding a member (issue 13 item 8): an observer account is never a study rater
  .superRefine((v, ctx) => {
    if (v.studyId && v.studyRole && !mayHoldStudyRole(v.role, v.studyRole))
      ctx.addIssue({ code: 'custom', path: ['studyRole'], message: studyRoleRefusal(v.role, v.studyRole) });
  });
export type InviteInput = z.input<typeof inviteSchema>;

const nameSchema = z.string().trim().min(1, { message: 'Enter your name.' }).max(200, { message: 'Use at most 200 characters.' });

const acceptFields = z.object({
  name: nameSchema,
  password: passwordSchema,
  confirmPassword: z.string().max(200),
});
const samePasswords = (v: { password: string; confirmPassword: string }) => v.password === v.confirmPassword;
const differ = { path: ['confirmPassword'], message: 'The two passwords differ.' };

/** The invitee's form: name and password (twice). */
export const acceptFormSchema = acceptFields.refine(samePasswords, differ);
export type AcceptFormInput = z.input<typeof acceptFormSchema>;

/** The accept request: the form plus the token from the link. */
export const acceptSchema = acceptFields.extend({ token: z.string().min(1).max(200) }).refine(samePasswords, differ);

/** The new-password form of a reset link. */
export const resetFormSchema = acceptFields.omit({ name: true }).refine(samePasswords, differ);
export type ResetFormInput = z.input<typeof resetFormSchema>;
export const resetCompleteSchema = acceptFields
  .omit({ name: true })
  .extend({ token: z.string().min(1).max(200) })
  .refine(samePasswords, differ);

/** The forgot-password form. */
export const resetRequestSchema = z.object({ email: emailSchema });
export type ResetRequestInput = z.input<typeof resetRequestSchema>;

export const idParams = z.object({ id: z.coerce.number().int().positive() });
