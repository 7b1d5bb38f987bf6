/** Payload of the `recalibrate` job kind (zod only), registered in ./payloads.ts. */
import { z } from 'zod';

export const RECALIBRATE = 'recalibrate';
/** `repeat` false for a one-off check (the daily job queues itself again while a study has an interval). */
export const recalibratePayloadSchema = z.object({ repeat: z.boolean().default(true) }).strict();
