/**
 * Payload schemas of every job kind (zod only, so a route handler can validate at enqueue time
 * without loading the worker's code). The worker validates again when it claims a job.
 */
import { z } from 'zod';
import { denoisePayloadSchema } from '@/lib/denoise/schema';
import { scoreSuggestionsPayloadSchema, trainSuggestionsPayloadSchema } from './suggestion-payloads';
import { recalibratePayloadSchema } from '@/lib/jobs/recalibrate-payload';
import { notifyAssignmentsPayloadSchema, notifyOverduePayloadSchema, notifyVotesCompletePayloadSchema } from '@/lib/notifications/payloads';
import { sendMailPayloadSchema } from '@/lib/mail/payloads';
import { releasePayloadSchema } from '@/lib/jobs/release-payload';
import { agreementReportPayloadSchema } from '@/lib/jobs/agreement-report-payload';

/** Overrides of the study protocol for one decomposition (all optional). */
export const decompositionOptionsSchema = z
  .object({
    /** 'auto' or a fixed number of components. */
    components: z.union([z.literal('auto'), z.number().int().min(1).max(500)]).optional(),
    dimMethod: z.enum(['iid-mdl', 'iid-aic', 'laplace', 'aic', 'mdl']).optional(),
    /** FastICA restarts for the reproducibility index (1 = off). */
    restarts: z.number().int().min(1).max(50).optional(),
    /** Keep this fraction of variance (0 < F < 1); replaces dimMethod. */
    varianceFraction: z.number().gt(0).lt(1).optional(),
    seed: z
      .number()
      .int()
      .min(0)
      .max(2 ** 31 - 1)
      .optional(),
    contrast: z.enum(['logcosh', 'exp', 'cube']).optional(),
    tol: z.number().positive().max(0.1).optional(),
    maxIter: z.number().int().min(1).max(10_000).optional(),
    drop: z.number().int().min(0).max(1000).optional(),
    detrend: z.boolean().optional(),
    varianceNorm: z.boolean().optional(),
  })
  .strict();

export const decomposePayloadSchema = z
  .object({
    runId: z.number().int().positive(),
    decompositionOptions: decompositionOptionsSchema.optional(),
  })
  .strict();

export type DecompositionOptionsInput = z.infer<typeof decompositionOptionsSchema>;
export type DecomposePayload = z.infer<typeof decomposePayloadSchema>;

/** kind → payload schema. A kind that is not listed here cannot be enqueued. */
export const jobPayloadSchemas = {
  decompose: decomposePayloadSchema,
  denoise: denoisePayloadSchema,
  release: releasePayloadSchema,
  'notify-assignments': notifyAssignmentsPayloadSchema,
  'notify-votes-complete': notifyVotesCompletePayloadSchema,
  'notify-overdue': notifyOverduePayloadSchema,
  'send-mail': sendMailPayloadSchema,
  'train-suggestions': trainSuggestionsPayloadSchema,
  'score-suggestions': scoreSuggestionsPayloadSchema,
  recalibrate: recalibratePayloadSchema,
  'agreement-report': agreementReportPayloadSchema,
} as const;

export type JobKindName = keyof typeof jobPayloadSchemas;
export type JobPayload<K extends JobKindName> = z.infer<(typeof jobPayloadSchemas)[K]>;

export function isJobKind(kind: string): kind is JobKindName {
  return Object.prototype.hasOwnProperty.call(jobPayloadSchemas, kind);
}

/** One line naming every problem of a payload, e.g. "runId: expected number, received string". */
export function describePayloadIssues(error: z.ZodError): string {
  return error.issues.map((i) => `${i.path.length ? i.path.join('.') : 'payload'}: ${i.message}`).join('; ');
}
