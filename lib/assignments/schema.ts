/**
 * Zod schemas of assignment changes, shared by the lead's assignments page (forms) and the route
 * handlers. A due date is a calendar day (YYYY-MM-DD, due at the end of that day UTC), a full ISO
 * instant, or null / "" to clear it.
 */
import { z } from 'zod';

const id = (what: string) =>
  z.coerce
    .number({ message: `Choose ${what}.` })
    .int({ message: `Choose ${what}.` })
    .positive({ message: `Choose ${what}.` });

/** "2026-12-08" → 2026-12-08T23:59:59.999Z; an ISO instant as given; "" / null → null. */
export const dueAtSchema = z
  .union([
    z.null(),
    z.literal(''),
    z.iso.date({ message: 'Enter the due date as a day, e.g. 2026-12-08.' }),
    z.iso.datetime({ offset: true, message: 'Enter the due date as a day, e.g. 2026-12-08.' }),
  ])
  .transform((v) => (!v ? null : /^\d{4}-\d{2}-\d{2}$/.test(v) ? new Date(`${v}T23:59:59.999Z`) : new Date(v)));

/** POST /api/runs/:id/assignments — add a rater to a run. */
export const addRaterSchema = z.object({ raterId: id('a rater'), dueAt: dueAtSchema.optional() }).strict();

/**
 * PATCH /api/runs/:id/assignments/:raterId — reassign the run from this rater to another
 * (`replaceWith`), and/or change this rater's due date. `confirm` is required when the rater being
 * replaced has votes on the run.
 */
export const changeAssignmentSchema = z
  .object({
    replaceWith: id('the rater who takes over').optional(),
    dueAt: dueAtSchema.optional(),
    confirm: z.boolean().optional().default(false),
  })
  .strict()
  .refine((v) => v.replaceWith !== undefined || v.dueAt !== undefined, {
    message: 'Give a rater to take over or a due date.',
    path: ['replaceWith'],
  });

/** DELETE /api/runs/:id/assignments/:raterId?confirm=1 — confirm is required when the rater has votes. */
export const removeRaterQuerySchema = z.object({
  confirm: z
    .enum(['1', 'true', '0', 'false'])
    .optional()
    .transform((v) => v === '1' || v === 'true'),
});

/** POST /api/runs/:id/assignments/:raterId/reopen — the lead's reason is kept in the audit log. */
export const reopenSchema = z
  .object({
    reason: z
      .string({ message: 'Give a reason for reopening (it is kept in the audit log).' })
      .trim()
      .min(3, { message: 'Give a reason for reopening (it is kept in the audit log).' })
      .max(500, { message: 'Keep the reason under 500 characters.' }),
  })
  .strict();

/** PATCH /api/runs/:id/assignments — one due date for every rater of the run. */
export const runDueSchema = z.object({ dueAt: dueAtSchema }).strict();

/** PATCH /api/studies/:id/assignments — one due date for every rater of many runs (open work only). */
export const bulkDueSchema = z
  .object({
    runIds: z
      .array(z.coerce.number().int().positive())
      .min(1, { message: 'Choose at least one run.' })
      .max(1000, { message: 'At most 1000 runs at once.' }),
    dueAt: dueAtSchema,
  })
  .strict();

/** Route addresses. */
export const studyParamsSchema = z.object({ id: z.coerce.number().int().positive({ message: 'must be a study number' }) });
export const runParamsSchema = z.object({ id: z.coerce.number().int().positive({ message: 'must be a run number' }) });
export const runRaterParamsSchema = runParamsSchema.extend({
  raterId: z.coerce.number().int().positive({ message: 'must be a rater number' }),
});
