import { handler } from '@/lib/api/handler';
import { devMailboxEnabled } from '@/lib/mail/config';
import { listMail } from '@/lib/mail/mailbox';
import { notFound } from '@/lib/errors';

const list = handler({ permission: 'mailbox.read' }, async () => ({ messages: (await listMail()).slice(0, 200) }));

// GET /api/dev/mailbox – messages caught by the local fake mail server (development, tests, demo only:
// 404 in production unless QUORUM_DEV_MAILBOX=1)
export async function GET(req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) {
  if (!devMailboxEnabled()) return notFound('This page').toResponse();
  return list(req, ctx);
}
