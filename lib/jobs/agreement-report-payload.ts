/** Payload of the `agreement-report` job kind (zod only, so a page can enqueue without the worker's code). */
import { z } from 'zod';

export const AGREEMENT_REPORT = 'agreement-report';

export const agreementReportPayloadSchema = z.object({ studyId: z.number().int().positive() }).strict();
