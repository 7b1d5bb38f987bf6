/** Payload of the `denoise` job kind (zod only, so route handlers can validate without the worker's code). */
import { z } from 'zod';

export const denoisePayloadSchema = z
  .object({
    runId: z.number().int().positive(),
    /** Take the noise list from this release; without it, from the run's current decisions. */
    releaseId: z.number().int().positive().optional(),
    mode: z.enum(['partial', 'full']).default('partial'),
    includeMotion: z.boolean().default(false),
  })
  .strict();

export type DenoisePayload = z.infer<typeof denoisePayloadSchema>;

/** What a finished denoise job records as its result. */
export type DenoiseResult = {
  key: string;
  name: string;
  sha256: string;
  bytes: number;
  mode: 'partial' | 'full';
  includeMotion: boolean;
  noise: number[];
  releaseId: number | null;
  volumes: number;
};
