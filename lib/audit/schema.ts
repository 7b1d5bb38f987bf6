import { z } from 'zod';

const optionalId = z.preprocess((v) => (v === '' || v === null ? undefined : v), z.coerce.number().int().positive().optional());
const optionalDate = z.preprocess(
  (v) => (v === '' || v === null ? undefined : v),
  z
    .string()
    .max(10)
    .regex(/^\d{4}-\d{2}-\d{2}$/, { message: 'Use a date like 2026-12-01.' })
    .optional(),
);

/** Filters of the audit log (query string of the list and the CSV export, and the filter form). */
export const auditFilterSchema = z
  .object({
    actorId: optionalId,
    action: z.preprocess(
      (v) => (v === '' ? undefined : v),
      z
        .string()
        .trim()
        .max(64)
        .regex(/^[a-z0-9_.]+$/, { message: 'Actions look like "user.role_changed".' })
        .optional(),
    ),
    studyId: optionalId,
    from: optionalDate,
    to: optionalDate,
  })
  .refine((v) => !v.from || !v.to || v.from <= v.to, { path: ['to'], message: 'The end date is before the start date.' });
export type AuditFilter = z.output<typeof auditFilterSchema>;
export type AuditFilterInput = z.input<typeof auditFilterSchema>;

export const auditPageSchema = z.intersection(
  auditFilterSchema,
  z.object({
    page: z.coerce.number().int().min(1).max(100_000).default(1),
    pageSize: z.coerce.number().int().min(1).max(200).default(50),
  }),
);
