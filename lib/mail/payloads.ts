// Payload of the send-mail job kind (zod only), registered in lib/jobs/payloads.ts.
import { z } from 'zod';

export const SEND_MAIL = 'send-mail';

/** send-mail: the mail_outbox row to send (its sealed content is the message). */
export const sendMailPayloadSchema = z.object({ outboxId: z.number().int().positive() }).strict();
