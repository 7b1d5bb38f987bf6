import { z } from 'zod';
import { wellFormed } from '@/lib/text';

/** A lead's decision on one component: the final label, its noise kind, and the reason (required). */
export const leadDecisionSchema = z.object({
  componentId: z.coerce.number().int().positive(),
  label: z.string().min(1).max(32),
  noiseKind: z.string().min(1).max(32).nullish(),
  reason: z
    .string()
    .trim()
    .min(3, { message: 'Give a reason (a few words) — it goes into the audit log and the export.' })
    .max(2000)
    .refine(...wellFormed('The reason')),
  /** The decision's version the lead saw (reconcile list); a decision changed since then is refused with 409. */
  baseVersion: z.coerce.number().int().min(0).max(2_147_483_647).optional(),
});
export type LeadDecisionInput = z.infer<typeof leadDecisionSchema>;

export const reconcileQuerySchema = z.object({
  runId: z.coerce.number().int().positive().optional(),
  noiseKind: z.string().max(32).optional(),
  include: z.enum(['pending', 'all']).default('pending'),
});

/** The decision a lead is shown when theirs was refused because it changed since they saw it (409). */
export type DecisionConflict = { conflict: { label: string | null; noiseKind: string | null; method: string; decidedBy: string | null } };
