/** Payload of the `release` job kind (zod only, so the request can validate without the worker's code). */
import { z } from 'zod';

export const releasePayloadSchema = z
  .object({
    studyId: z.number().int().positive(),
    /** Release one run instead of the whole study. */
    runId: z.number().int().positive().nullable(),
    notes: z.string().max(2000).nullable(),
    /** The requester's address, for the audit entry the job writes. */
    ip: z.string().max(100).nullable(),
  })
  .strict();

export type ReleasePayload = z.infer<typeof releasePayloadSchema>;

/** What a finished release job records as its result. */
export type ReleaseJobResult = { releaseId: number; version: number; files: number };
